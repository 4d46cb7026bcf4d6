import { describe, expect, it } from "vitest";
import { markInputSchema } from "./marks";

describe("mark rules", () => {
  it("checks times against the duration and spans for order", () => {
    const s = markInputSchema(10);
    expect(s.safeParse({ tStart: 2, tEnd: 4, text: "x" }).success).toBe(true);
    expect(s.safeParse({ tStart: 10.5, text: "x" }).error?.issues[0].path).toEqual(["tStart"]);
    expect(s.safeParse({ tStart: 4, tEnd: 4, text: "x" }).error?.issues[0].path).toEqual(["tEnd"]);
    expect(s.safeParse({ tStart: 1, text: "x", tags: ["Torque", "torque ", "moly"] }).data?.tags).toEqual(["Torque", "moly"]);
    // Unknown duration (not probed yet): only the lower bound applies.
    expect(markInputSchema(null).safeParse({ tStart: 99999, text: "x" }).success).toBe(true);
  });
});
