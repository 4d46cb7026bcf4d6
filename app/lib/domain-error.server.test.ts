import { describe, expect, it } from "vitest";
import { DomainError } from "./domain-error";
import { domainFailure, unknownAction } from "./domain-error.server";

const page = { url: "http://shop.test/test-records/abc" };
const api = { url: "http://shop.test/api/recordings/abc/marks" };

describe("domainFailure", () => {
  it("gives the API its status, reason, issues and details as JSON", async () => {
    const err = new DomainError("The mark was changed by someone else.", {
      status: 409,
      issues: [{ path: "t", message: "moved" }],
      details: { current: { t: 3 } },
    });
    const res = domainFailure(api, err) as Response;
    expect(res.status).toBe(409);
    expect(await res.json()).toEqual({
      error: "conflict",
      reason: "The mark was changed by someone else.",
      issues: [{ path: "t", message: "moved" }],
      current: { t: 3 },
    });
  });

  it("gives a page the reason under its field, the issues by path and the values typed", () => {
    const err = new DomainError("That number is taken.", {
      status: 422,
      field: "number",
      issues: [{ path: "customer", message: "Name the customer." }],
    });
    const out = domainFailure(page, err, "save", { number: "LEW-1" }) as unknown as { data: unknown; init: { status: number } };
    expect(out.init.status).toBe(422);
    expect(out.data).toEqual({
      intent: "save",
      errors: { number: "That number is taken.", customer: "Name the customer." },
      values: { number: "LEW-1" },
    });
  });

  it("rethrows anything that is not a domain error", () => {
    const boom = new TypeError("x is undefined");
    expect(() => domainFailure(page, boom)).toThrow(boom);
  });

  it("answers an unknown form intent with 400", async () => {
    const res = unknownAction(api, "explode") as Response;
    expect(res.status).toBe(400);
    expect((await res.json()).error).toBe("bad request");
  });
});
