// The edge layer's schemas and helpers (app/lib/edge.ts, edge-limits.ts, forms.ts), without a
// server. Limits checked against their sources: PostgreSQL's integer range (PostgreSQL 15
// documentation, 8.1.1 Integer Types: −2147483648 to +2147483647), the Gregorian calendar's
// leap-year rule (ISO 8601-1:2019, 3.2.1), and unit factors through the calc module's toSI.
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { sanitizeDocument } from "./procedures/document";
import { readingInputSchema } from "./recordings/quantities";
import { parseReadings, headerSchema } from "./test-records/form";
import { bodyLimitFor, DEFAULT_BODY_LIMIT } from "./edge-limits";
import {
  INT4_MAX,
  isRealDate,
  isUuid,
  nulPath,
  optionalParam,
  optionalSearch,
  positiveInt,
  positiveIntParam,
  quantityProblem,
  searchObject,
  slug,
  uuid,
  versionSearch,
} from "./edge";
import { parseForm } from "./forms";

describe("ids, numbers and slugs in addresses", () => {
  it("takes UUIDs of any version and nothing else", () => {
    expect(uuid.safeParse("00000000-0000-4000-8000-000000000000").success).toBe(true);
    expect(uuid.safeParse("6F9619FF-8B86-D011-B42D-00C04FC964FF").success).toBe(true);
    for (const bad of ["not-a-uuid", "------------------------------------", "00000000-0000-0000-0000-00000000000g", "", "1"])
      expect(uuid.safeParse(bad).success, bad).toBe(false);
    expect(isUuid(42)).toBe(false);
  });

  it("takes revision numbers from 1 to 2³¹−1 (PostgreSQL integer), digits only", () => {
    expect(INT4_MAX).toBe(2 ** 31 - 1);
    expect(positiveIntParam.parse("1")).toBe(1);
    expect(positiveIntParam.parse("2147483647")).toBe(2147483647);
    for (const bad of ["2147483648", "99999999999999999999", "0", "-1", "1.5", "1e3", "abc", "", " 1"])
      expect(positiveIntParam.safeParse(bad).success, bad).toBe(false);
    expect(positiveInt.safeParse(2147483648).success).toBe(false);
    expect(positiveInt.safeParse(2147483647).success).toBe(true);
    expect(versionSearch.parse({ v: "0" })).toEqual({ v: 0 }); // a test record as filed
    expect(versionSearch.safeParse({ v: "2147483648" }).success).toBe(false);
  });

  it("takes slugs as slugify makes them", () => {
    expect(slug.safeParse("head-stud-torque-2").success).toBe(true);
    for (const bad of ["Head", "-x", "a b", "a\u0000b", "x".repeat(201), ""]) expect(slug.safeParse(bad).success, bad).toBe(false);
  });
});

describe("dates that exist", () => {
  it("follows the Gregorian leap-year rule and refuses year 0000", () => {
    expect(isRealDate("2024-02-29")).toBe(true); // divisible by 4
    expect(isRealDate("2000-02-29")).toBe(true); // divisible by 400
    expect(isRealDate("1900-02-29")).toBe(false); // by 100, not by 400
    expect(isRealDate("2023-02-29")).toBe(false);
    expect(isRealDate("2024-02-30")).toBe(false);
    expect(isRealDate("2024-04-31")).toBe(false);
    expect(isRealDate("2024-13-01")).toBe(false);
    expect(isRealDate("0000-01-01")).toBe(false);
    expect(isRealDate("2024-2-3")).toBe(false);
  });

  it("a test record's header: a real day, not before 1900, not in the future; a recording span in range", () => {
    const base = { title: "Bore check", engineSerial: "", notes: "" };
    expect(headerSchema.safeParse({ ...base, testedOn: "2024-02-29" }).success).toBe(true);
    for (const d of ["2024-02-30", "0000-01-01", "1899-12-31", "9999-01-01"])
      expect(headerSchema.safeParse({ ...base, testedOn: d }).success, d).toBe(false);
    expect(headerSchema.safeParse({ ...base, testedOn: "2024-02-29", recordingStartS: "1e308" }).success).toBe(false);
    expect(headerSchema.safeParse({ ...base, testedOn: "2024-02-29", recordingStartS: "12.5" }).success).toBe(true);
  });
});

describe("text without NUL", () => {
  it("refuses a NUL in text, in search params, and anywhere in a JSON value", () => {
    const s = z.object({ q: optionalParam(10) });
    expect(s.safeParse({ q: "a\u0000" }).success).toBe(false);
    expect(s.safeParse({ q: "" }).data).toEqual({ q: undefined });
    expect(s.safeParse({ q: "x".repeat(11) }).success).toBe(false);
    expect(nulPath({ a: [{ b: "ok" }, { c: "x\u0000" }] })).toEqual(["a", 1, "c"]);
    expect(nulPath({ "k\u0000": 1 })).toEqual(["k\u0000"]);
    expect(nulPath({ a: ["fine", 1, null, true] })).toBeNull();
  });

  it("parseForm makes a NUL in any field that field's error, and keeps the values without it", () => {
    const form = new FormData();
    form.set("title", "Bore\u0000check");
    form.set("unlisted", "x\u0000");
    const r = parseForm(z.object({ title: z.string() }), form);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(Object.keys(r.errors).sort()).toEqual(["title", "unlisted"]);
      expect(r.values.title).toBe("Borecheck");
    }
  });

  it("reads search params as an object, first value of each name; blank optional params are absent", () => {
    expect(searchObject("http://x/p?a=1&a=2&b=")).toEqual({ a: "1", b: "" });
    const s = z.object({ id: optionalSearch(uuid) });
    expect(s.parse({ id: "  " })).toEqual({ id: undefined });
    expect(s.safeParse({ id: "nope" }).success).toBe(false);
  });
});

describe("quantities within what a gauge can read (SI)", () => {
  it("refuses non-finite values and values past the range, in the unit typed", () => {
    expect(quantityProblem(12_000, "lbf")).toBeNull(); // 53.4 kN
    expect(quantityProblem(1e308, "lbf")).toMatch(/too large|outside/); // its SI value overflows to Infinity
    expect(quantityProblem(3e6, "lbf")).toMatch(/outside/); // 13.3 MN > 10 MN
    expect(quantityProblem(Number.POSITIVE_INFINITY, "mm")).toMatch(/finite/);
    expect(quantityProblem(88.006, "mm")).toBeNull();
    expect(quantityProblem(20_000, "mm")).toMatch(/outside/); // 20 m
    expect(quantityProblem(-274, "degC")).toMatch(/absolute zero/); // below 0 K
    expect(quantityProblem(150, "%")).toMatch(/0 to 100/);
    expect(quantityProblem(1e13, "widgets")).toMatch(/outside/);
  });

  it("a reading of 1e308 lbf is a field error on value, never stored as Infinity", () => {
    const r = readingInputSchema(60).safeParse({ quantity: "clamp-load", value: 1e308, unit: "lbf" });
    expect(r.success).toBe(false);
    if (!r.success) expect(r.error.issues.map((i) => i.path.join("."))).toEqual(["value"]);
    expect(readingInputSchema(60).safeParse({ quantity: "clamp-load", value: 12_000, unit: "lbf" }).success).toBe(true);
    const cold = readingInputSchema(60).safeParse({ quantity: "temperature", value: -300, unit: "degC" });
    expect(cold.success).toBe(false);
    if (!cold.success) expect(cold.error.issues).toHaveLength(1); // one reason, not two
  });

  it("a spec's nominal, min and max are within range", () => {
    const spec = (a: Record<string, unknown>) =>
      sanitizeDocument({
        type: "doc",
        content: [
          { type: "spec", attrs: { id: "s", label: "Torque", quantity: "torque", unit: "N.m", nominal: null, min: null, max: null, ...a } },
        ],
      });
    expect(spec({ nominal: 110 }).ok).toBe(true);
    const huge = spec({ nominal: 1e308 });
    expect(huge.ok).toBe(false);
    if (!huge.ok) expect(huge.errors[0].path).toMatch(/nominal$/);
    expect(spec({ max: 5e5 }).ok).toBe(false);
  });

  it("a test record's typed reading past the range is that row's error", () => {
    const spec = {
      id: "00000000-0000-4000-8000-000000000001",
      label: "Bore",
      quantity: "length",
      unit: "mm",
      min: 87.9,
      max: 88.1,
      nominal: 88,
    };
    const form = new FormData();
    form.set(`r.${spec.id}.0.value`, "1e308");
    form.set(`r.${spec.id}.0.unit`, "mm");
    form.set(`r.${spec.id}.1.value`, "88");
    form.set(`r.${spec.id}.1.unit`, "mm");
    form.set(`r.${spec.id}.1.src`, "not-an-id");
    const r = parseReadings(form, [spec]);
    expect(r.count).toBe(0);
    expect(Object.keys(r.errors).sort()).toEqual([`r.${spec.id}.0.value`, `r.${spec.id}.1.value`]);
  });
});

describe("body limits by route", () => {
  it("small for the public forms, large for the editor's save, none of its own for tus", () => {
    expect(bodyLimitFor("/signin").bytes).toBeLessThanOrEqual(16 * 1024);
    expect(bodyLimitFor("/reset/abc").bytes).toBeLessThanOrEqual(16 * 1024);
    expect(bodyLimitFor("/invite/abc.data").bytes).toBeLessThanOrEqual(16 * 1024);
    expect(bodyLimitFor("/admin/people").bytes).toBeLessThanOrEqual(16 * 1024);
    expect(bodyLimitFor("/api/procedures/revisions/x").bytes).toBeGreaterThanOrEqual(4 * 1024 * 1024);
    expect(bodyLimitFor("/api/uploads/abc").bytes).toBeNull();
    expect(bodyLimitFor("/_root.data")).toEqual(DEFAULT_BODY_LIMIT);
  });
});
