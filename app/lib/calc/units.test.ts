import fc from "fast-check";
import { unit as mathUnit } from "mathjs";
import { describe, expect, test } from "vitest";
import { ZodError } from "zod";
import { UNIT_CODES, UNIT_OPTIONS, convert, fromSI, toSI, type UnitCode } from "./index";

// NIST Special Publication 811 (2008 ed.), Appendix B.8 "Factors for units listed alphabetically"
// and B.9 "by kind of quantity". Values typed here from memory of that appendix; "exact" ones are
// marked there in bold. Our codes use the exact definitions (1 in = 0.0254 m, 1 lbf = 4.4482216152605 N),
// so they agree with the rounded SP 811 factors to the 7 significant figures SP 811 prints.
describe("conversion factors against NIST SP 811 Appendix B", () => {
  const cases: [string, UnitCode, UnitCode, number, number][] = [
    // [what, from, to, SP 811 factor, relative tolerance]
    ["inch to metre (exact)", "in", "m", 2.54e-2, 1e-15],
    ["mil (thou) to metre (exact)", "thou", "m", 2.54e-5, 1e-15],
    ["pound-force to newton", "lbf", "N", 4.448222, 1e-7],
    ["foot pound-force to newton metre", "ft.lbf", "N.m", 1.355818, 1e-6],
    ["inch pound-force to newton metre", "in.lbf", "N.m", 1.129848e-1, 1e-6],
    ["psi to pascal", "psi", "Pa", 6.894757e3, 1e-7],
    ["ksi to pascal", "ksi", "Pa", 6.894757e6, 1e-7],
    ["bar to pascal (exact)", "bar", "Pa", 1.0e5, 1e-15],
    ["kilonewton to newton (SI prefix)", "kN", "N", 1e3, 1e-15],
    ["micrometre to metre (SI prefix)", "um", "m", 1e-6, 1e-15],
    ["megapascal to pascal (SI prefix)", "MPa", "Pa", 1e6, 1e-15],
  ];
  test.each(cases)("%s", (_what, from, to, factor, tol) => {
    const got = convert(1, from, to);
    expect(Math.abs(got - factor) / factor).toBeLessThanOrEqual(Math.max(tol, 5e-16));
  });

  test("the contract's exact factors: 1 in = 25.4 mm, 1 lbf = 4.4482216152605 N, 1 ft·lbf = 1.3558179483314004 N·m", () => {
    // docs/calculations.md, "Quantities and unit codes".
    expect(convert(1, "in", "mm")).toBe(25.4);
    expect(convert(1, "lbf", "N")).toBe(4.4482216152605);
    // 1 ft·lbf = 0.3048 m × 4.4482216152605 N = 1.3558179483314004 N·m (NIST SP 811, B.8), written as the product:
    // the 17-digit decimal is not a double.
    expect(convert(1, "ft.lbf", "N.m")).toBeCloseTo(0.3048 * 4.4482216152605, 15);
  });

  test("temperatures are affine (SP 811 B.8: T/K = t/°C + 273.15; T/K = (t/°F + 459.67)/1.8)", () => {
    expect(convert(0, "degC", "K")).toBeCloseTo(273.15, 12);
    expect(convert(100, "degC", "degF")).toBeCloseTo(212, 12);
    expect(convert(32, "degF", "degC")).toBeCloseTo(0, 12);
    expect(convert(-40, "degF", "degC")).toBeCloseTo(-40, 12);
    expect(convert(0, "K", "degF")).toBeCloseTo(-459.67, 10);
    // (t/°F + 459.67)/1.8 for 68 °F
    expect(convert(68, "degF", "K")).toBeCloseTo((68 + 459.67) / 1.8, 12);
  });
});

// mathjs as an independent implementation of the same units. mathjs has no "thou" or "ksi":
// its "mil" is 0.001 in, and ksi is 1000 psi.
describe("cross-check with mathjs units", () => {
  const MATHJS: Record<UnitCode, string> = {
    m: "m",
    mm: "mm",
    um: "um",
    in: "inch",
    thou: "mil",
    N: "N",
    kN: "kN",
    lbf: "lbf",
    "N.m": "N m",
    "ft.lbf": "ft lbf",
    "in.lbf": "inch lbf",
    Pa: "Pa",
    kPa: "kPa",
    MPa: "MPa",
    GPa: "GPa",
    psi: "psi",
    ksi: "psi",
    bar: "bar",
    degC: "degC",
    degF: "degF",
    K: "K",
  };
  const kinds = Object.keys(UNIT_CODES) as (keyof typeof UNIT_CODES)[];

  test("every pair of codes of one kind agrees with mathjs (relative 1e-9)", () => {
    for (const kind of kinds) {
      const codes = UNIT_CODES[kind] as readonly UnitCode[];
      for (const from of codes) {
        for (const to of codes) {
          const x = 37.5;
          const inFrom = from === "ksi" ? x * 1000 : x; // mathjs has psi only
          let expected = mathUnit(inFrom, MATHJS[from]).toNumber(MATHJS[to]);
          if (to === "ksi") expected /= 1000;
          const got = convert(x, from, to);
          expect(Math.abs(got - expected)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected)));
        }
      }
    }
  });

  test("random values agree with mathjs (fast-check)", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), (x) => {
        const expected = mathUnit(x, "ft lbf").toNumber("N m");
        expect(Math.abs(convert(x, "ft.lbf", "N.m") - expected)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected)));
      }),
    );
    // Temperatures only from absolute zero up (colder ones are refused, below).
    fc.assert(
      fc.property(fc.double({ min: -459.67, max: 1e6, noNaN: true }), (x) => {
        const t = mathUnit(x, "degF").toNumber("degC");
        expect(Math.abs(convert(x, "degF", "degC") - t)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(t)));
      }),
    );
  });
});

// Absolute zero: 0 K = −273.15 °C = −459.67 °F (SI Brochure, 9th ed., 2.3.4, Table 4:
// t/°C = T/K − 273.15; NIST SP 811 (2008), B.8: T/K = (t/°F + 459.67)/1.8). mathjs places
// absolute zero at the same values, but converts colder numbers without complaint.
describe("convert: temperatures below absolute zero are refused", () => {
  test("mathjs agrees where absolute zero lies in each unit", () => {
    expect(mathUnit(0, "K").toNumber("degC")).toBeCloseTo(-273.15, 10);
    expect(mathUnit(0, "K").toNumber("degF")).toBeCloseTo(-459.67, 10);
    expect(convert(0, "K", "degC")).toBeCloseTo(mathUnit(0, "K").toNumber("degC"), 10);
    expect(convert(0, "K", "degF")).toBeCloseTo(mathUnit(0, "K").toNumber("degF"), 10);
  });

  test("absolute zero itself converts: −273.15 °C and −459.67 °F are 0 K", () => {
    expect(convert(-273.15, "degC", "K")).toBe(0);
    expect(convert(-459.67, "degF", "K")).toBe(0);
    expect(convert(-459.67, "degF", "degC")).toBeCloseTo(-273.15, 10);
  });

  test.each([
    [-500, "degF", "K"],
    [-1, "K", "degC"],
    [-273.16, "degC", "degF"],
    [-459.68, "degF", "degC"],
    [-0.001, "K", "K"],
    [-300, "degC", "degC"],
  ] as const)("%s %s → %s is a ZodError at value", (value, from, to) => {
    let err: unknown;
    try {
      convert(value, from, to);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ZodError);
    expect((err as ZodError).issues.map((i) => i.path.join("."))).toEqual(["value"]);
    expect((err as ZodError).issues[0].message).toMatch(/below absolute zero/);
  });

  test("any value below absolute zero is refused in every temperature unit (fast-check)", () => {
    const codes = UNIT_CODES.temperature;
    fc.assert(
      fc.property(
        fc.constantFrom(...codes),
        fc.constantFrom(...codes),
        fc.double({ min: 1e-6, max: 1e6, noNaN: true }),
        (from, to, below) => {
          const zero = mathUnit(0, "K").toNumber(from);
          expect(() => convert(zero - below, from, to)).toThrow(ZodError);
        },
      ),
    );
  });
});

describe("convert: errors and round trips", () => {
  test("incompatible kinds throw a ZodError", () => {
    expect(() => convert(1, "mm", "N")).toThrow(ZodError);
    expect(() => convert(1, "N.m", "lbf")).toThrow(ZodError);
    expect(() => convert(1, "degC", "Pa")).toThrow(ZodError);
  });
  test("unknown codes and non-finite values throw", () => {
    expect(() => convert(1, "mm", "furlong")).toThrow(ZodError);
    expect(() => convert(1, "Nm", "N.m")).toThrow(ZodError); // codes are exact: "N.m"
    expect(() => convert(1, "MM", "m")).toThrow(ZodError); // case-sensitive
    expect(() => convert(Number.NaN, "mm", "m")).toThrow(ZodError);
    expect(() => convert(Number.POSITIVE_INFINITY, "mm", "m")).toThrow(ZodError);
  });
  test("any value converted there and back is unchanged (fast-check)", () => {
    const allCodes = Object.values(UNIT_CODES).flat() as UnitCode[];
    fc.assert(
      fc.property(fc.constantFrom(...allCodes), fc.double({ min: -1e9, max: 1e9, noNaN: true }), (code, x) => {
        expect(fromSI(toSI(x, code), code)).toBeCloseTo(x, 4);
      }),
    );
  });
  test("UNIT_OPTIONS labels for the UI use proper symbols", () => {
    const label = (kind: keyof typeof UNIT_OPTIONS, code: string) => UNIT_OPTIONS[kind].find((o) => o.code === code)?.label;
    expect(label("torque", "N.m")).toBe("N·m");
    expect(label("torque", "ft.lbf")).toBe("ft·lbf");
    expect(label("length", "um")).toBe("µm");
    expect(label("length", "thou")).toBe("thou");
    expect(label("temperature", "degC")).toBe("°C");
    for (const kind of Object.keys(UNIT_CODES) as (keyof typeof UNIT_CODES)[]) {
      expect(UNIT_OPTIONS[kind].map((o) => o.code)).toEqual([...UNIT_CODES[kind]]);
    }
  });
});
