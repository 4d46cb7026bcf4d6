import { describe, expect, it } from "vitest";
import { normalizeTags, sameTag, tagKey } from "./tags";

describe("tags", () => {
  it("keep the author's spelling for display", () => {
    expect(normalizeTags("head studs, 2.3 L, MLS gasket")).toEqual(["head studs", "2.3 L", "MLS gasket"]);
  });

  it("drop duplicates that differ only in case or spacing, keeping the first spelling", () => {
    expect(normalizeTags(["2.3 L", "2.3 l", " 2.3   L ", "Moly", "moly"])).toEqual(["2.3 L", "Moly"]);
  });

  it("compare case-insensitively", () => {
    expect(sameTag("2.3 L", "2.3 l")).toBe(true);
    expect(sameTag("MLS  gasket", "mls gasket")).toBe(true);
    expect(sameTag("moly", "oil")).toBe(false);
    expect(tagKey(" Head  Studs ")).toBe("head studs");
  });

  it("keep at most 12 tags of at most 40 characters and no empty ones", () => {
    const many = Array.from({ length: 20 }, (_, i) => `Tag ${i}`);
    expect(normalizeTags(many)).toHaveLength(12);
    expect(normalizeTags([`${"x".repeat(45)}`, " ", ""])).toEqual(["x".repeat(40)]);
  });
});
