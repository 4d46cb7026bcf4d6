import fc from "fast-check";
import { afterEach, beforeEach, describe, expect, test } from "vitest";
import { ZodError } from "zod";
import {
  UNIT_CODES,
  calculateClearance,
  calculateDistortion,
  calculatePreload,
  clearanceInputSchema,
  distortionInputSchema,
  fitNutFactor,
  preloadInputSchema,
  threadGeometry,
} from "./index";
import { hotPistonToWall } from "../../../tests/support/calc-inputs";

/** The issue paths ("torque.value") of the ZodError `fn` throws. */
function issuePaths(fn: () => unknown): string[] {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(ZodError);
    return (e as ZodError).issues.map((i) => i.path.join("."));
  }
  throw new Error("expected a ZodError, nothing was thrown");
}

const nut = { kind: "nut-factor" as const, k: 0.15 };
const preload = (over: Record<string, unknown>) => () =>
  calculatePreload({ thread: "M12x1.5", torque: { value: 110, unit: "N.m" }, method: nut, ...over } as never);

describe("preload: invalid input is a ZodError with a path", () => {
  test.each([
    ["NaN torque", { torque: { value: Number.NaN, unit: "N.m" } }, "torque.value"],
    ["infinite torque", { torque: { value: Number.POSITIVE_INFINITY, unit: "N.m" } }, "torque.value"],
    ["negative torque", { torque: { value: -10, unit: "N.m" } }, "torque.value"],
    ["zero torque", { torque: { value: 0, unit: "N.m" } }, "torque.value"],
    ["absurd torque", { torque: { value: 1e9, unit: "ft.lbf" } }, "torque.value"],
    ["torque given in mm", { torque: { value: 110, unit: "mm" } }, "torque.unit"],
    ["torque as a string", { torque: { value: "110", unit: "N.m" } }, "torque.value"],
    ["unknown thread", { thread: "M13x1.5" }, "thread"],
    ["thread not a string", { thread: 12 }, "thread"],
    ["zero nut factor", { method: { kind: "nut-factor", k: 0 } }, "method.k"],
    ["nut factor above 1", { method: { kind: "nut-factor", k: 1.5 } }, "method.k"],
    [
      "friction above 1",
      { method: { kind: "friction", muThread: 1.2, muHead: 0.1, headDiameter: { value: 17, unit: "mm" } } },
      "method.muThread",
    ],
    [
      "negative head friction",
      { method: { kind: "friction", muThread: 0.1, muHead: -0.1, headDiameter: { value: 17, unit: "mm" } } },
      "method.muHead",
    ],
    [
      "head diameter in N",
      { method: { kind: "friction", muThread: 0.1, muHead: 0.1, headDiameter: { value: 17, unit: "N" } } },
      "method.headDiameter.unit",
    ],
    ["unknown method", { method: { kind: "guess" } }, "method.kind"],
    ["unknown property class", { material: { propertyClass: "9.9" } }, "material.propertyClass"],
    ["yield in mm", { material: { yieldStrength: { value: 900, unit: "mm" } } }, "material.yieldStrength.unit"],
    ["negative grip", { grip: { length: { value: -5, unit: "mm" } } }, "grip.length.value"],
    ["zero modulus", { grip: { length: { value: 50, unit: "mm" }, modulus: { value: 0, unit: "GPa" } } }, "grip.modulus.value"],
    ["unknown direction", { direction: "sideways" }, "direction"],
  ])("%s", (_what, over, path) => {
    expect(issuePaths(preload(over))).toContain(path);
  });

  test("the quantity for the direction is required", () => {
    expect(issuePaths(() => calculatePreload({ thread: "M10", method: nut }))).toContain("torque");
    expect(
      issuePaths(() =>
        calculatePreload({ thread: "M10", direction: "preload-to-torque", torque: { value: 50, unit: "N.m" }, method: nut }),
      ),
    ).toContain("preload");
    expect(
      issuePaths(() => calculatePreload({ thread: "M10", direction: "preload-to-torque", preload: { value: 0, unit: "kN" }, method: nut })),
    ).toContain("preload.value");
  });

  test("threadGeometry and the schema agree on unknown threads", () => {
    expect(issuePaths(() => threadGeometry("M12x1.6"))).toEqual(["thread"]);
    expect(preloadInputSchema.safeParse({ thread: "M12x1.6", torque: { value: 1, unit: "N.m" }, method: nut }).success).toBe(false);
  });

  test("schemas validate only: a parsed input is again a valid input and gives the same result", () => {
    const input = { thread: "m12 x 1.5", torque: { value: 80, unit: "ft.lbf" as const }, method: nut, material: { propertyClass: "10.9" } };
    const parsed = preloadInputSchema.parse(input);
    expect(calculatePreload(parsed)).toEqual(calculatePreload(input));
  });
});

// Names inherited by every plain JavaScript object (ECMAScript, "Properties of the Object
// Prototype Object"): a table looked up as a plain object finds these for any name.
const INHERITED_NAMES = ["constructor", "__proto__", "toString", "hasOwnProperty", "valueOf", "isPrototypeOf"];

describe("names of the module's tables: only the tables' own entries", () => {
  test.each(INHERITED_NAMES)("property class %j is a ZodError at material.propertyClass", (name) => {
    expect(issuePaths(preload({ material: { propertyClass: name } }))).toEqual(["material.propertyClass"]);
  });

  test.each(INHERITED_NAMES)("piston or bore material %j is a ZodError at its path", (name) => {
    expect(issuePaths(() => calculateClearance(hotPistonToWall({ pistonMaterial: name }) as never))).toContain("thermal.pistonMaterial");
    expect(issuePaths(() => calculateClearance(hotPistonToWall({ boreMaterial: name }) as never))).toContain("thermal.boreMaterial");
  });

  test("common spellings still resolve, and the parsed input names the table's id", () => {
    const p = preloadInputSchema.parse({
      thread: "M12x1.5",
      torque: { value: 80, unit: "N.m" },
      method: nut,
      material: { propertyClass: "Grade 8" },
    });
    expect(p.material?.propertyClass).toBe("SAE-8");
    const c = clearanceInputSchema.parse(hotPistonToWall({ pistonMaterial: "2618", boreMaterial: "CGI" }));
    expect(c.kind === "piston-to-wall" && c.thermal).toMatchObject({
      pistonMaterial: "forged-2618",
      boreMaterial: "compacted-graphite-iron",
    });
  });
});

describe("distortion and clearance: invalid input is a ZodError with a path", () => {
  const reading = (over: Record<string, unknown> = {}) => ({
    depth: { value: 10, unit: "mm" },
    angleDeg: 0,
    diameter: { value: 88, unit: "mm" },
    ...over,
  });

  test.each([
    ["no readings", { readings: [] }, "readings"],
    ["negative diameter", { readings: [reading({ diameter: { value: -88, unit: "mm" } })] }, "readings.0.diameter.value"],
    ["zero diameter", { readings: [reading({ diameter: { value: 0, unit: "mm" } })] }, "readings.0.diameter.value"],
    ["diameter in N", { readings: [reading(), reading({ diameter: { value: 88, unit: "N" } })] }, "readings.1.diameter.unit"],
    ["NaN angle", { readings: [reading({ angleDeg: Number.NaN })] }, "readings.0.angleDeg"],
    ["absurd diameter", { readings: [reading({ diameter: { value: 1e9, unit: "mm" } })] }, "readings.0.diameter.value"],
    ["negative depth", { readings: [reading({ depth: { value: -1, unit: "mm" } })] }, "readings.0.depth.value"],
    ["radial reading without radius", { mode: "radial", readings: [reading()] }, "readings.0.radius"],
    ["unknown mode", { mode: "three-point", readings: [reading()] }, "mode"],
    [
      "bad compared state",
      { readings: [reading()], compareTo: { readings: [reading({ diameter: undefined })] } },
      "compareTo.readings.0.diameter",
    ],
  ])("distortion: %s", (_what, input, path) => {
    expect(issuePaths(() => calculateDistortion(input as never))).toContain(path);
  });

  const q = (value: number, unit = "mm") => ({ value, unit });
  test.each([
    ["unknown kind", { kind: "valve-lash" }, "kind"],
    ["negative bore", { kind: "piston-to-wall", bore: q(-88), piston: q(87.9) }, "bore.value"],
    ["piston in psi", { kind: "piston-to-wall", bore: q(88), piston: q(87.9, "psi") }, "piston.unit"],
    ["absurd bore", { kind: "piston-to-wall", bore: q(1e12), piston: q(87.9) }, "bore.value"],
    [
      "below absolute zero",
      {
        kind: "piston-to-wall",
        bore: q(88),
        piston: q(87.9),
        thermal: {
          ambient: q(-300, "degC"),
          boreTemperature: q(90, "degC"),
          pistonTemperature: q(150, "degC"),
          boreMaterial: "grey-cast-iron",
          pistonMaterial: "forged-2618",
        },
      },
      "thermal.ambient.value",
    ],
    [
      "unknown material",
      {
        kind: "piston-to-wall",
        bore: q(88),
        piston: q(87.9),
        thermal: {
          ambient: q(20, "degC"),
          boreTemperature: q(90, "degC"),
          pistonTemperature: q(150, "degC"),
          boreMaterial: "unobtainium",
          pistonMaterial: "forged-2618",
        },
      },
      "thermal.boreMaterial",
    ],
    [
      "alpha typed in µm/m·K",
      {
        kind: "piston-to-wall",
        bore: q(88),
        piston: q(87.9),
        thermal: {
          ambient: q(20, "degC"),
          boreTemperature: q(90, "degC"),
          pistonTemperature: q(150, "degC"),
          boreMaterial: "grey-cast-iron",
          pistonMaterial: { alphaPerK: 22.3 },
        },
      },
      "thermal.pistonMaterial.alphaPerK",
    ],
    ["bearing without bore", { kind: "bearing", journal: q(50) }, "bearingBore"],
    ["bearing shells without housing", { kind: "bearing", journal: q(50), shellThickness: q(1.5) }, "housingBore"],
    ["zero gap factor", { kind: "ring-gap", bore: q(88), gapPerBore: 0 }, "gapPerBore"],
    ["negative measured gap", { kind: "ring-gap", bore: q(88), gapPerBore: 0.0045, measuredGap: q(-0.1) }, "measuredGap.value"],
    ["spec min above max", { kind: "piston-to-wall", bore: q(88), piston: q(87.9), spec: { min: q(0.08), max: q(0.05) } }, "spec.max"],
  ])("clearance: %s", (_what, input, path) => {
    expect(issuePaths(() => calculateClearance(input as never))).toContain(path);
  });

  test("clearance and distortion schemas are exported and reject the same input", () => {
    expect(clearanceInputSchema.safeParse({ kind: "bearing", journal: q(50) }).success).toBe(false);
    expect(distortionInputSchema.safeParse({ readings: [] }).success).toBe(false);
  });
});

/** Every number anywhere in `x` is finite. */
function allFinite(x: unknown): boolean {
  if (typeof x === "number") return Number.isFinite(x);
  if (Array.isArray(x)) return x.every(allFinite);
  if (x && typeof x === "object") return Object.values(x).every(allFinite);
  return true;
}

describe("fuzz: any input gives a ZodError or a result with only finite numbers (fast-check)", () => {
  // Generators mostly give plausible values (so that the math runs) and sometimes anything:
  // NaN, ±Infinity, 0, negatives, huge or tiny magnitudes, wrong or unknown units.
  const wild = fc.oneof(fc.double(), fc.constantFrom(0, -0, -1, Number.NaN, Number.POSITIVE_INFINITY, -Number.MAX_VALUE, 1e300, 5e-324));
  // `good`: weight of the plausible branch against 1 for the wild one.
  const num = (min: number, max: number, good = 12) =>
    fc.oneof({ arbitrary: fc.double({ min, max, noNaN: true }), weight: good }, { arbitrary: wild, weight: 1 });
  const units = Object.values(UNIT_CODES).flat() as string[];
  const unit = (likely: string[], good = 12) =>
    fc.oneof(
      { arbitrary: fc.constantFrom(...likely), weight: good },
      { arbitrary: fc.constantFrom(...units), weight: 1 },
      { arbitrary: fc.string(), weight: 1 },
    );
  const quantity = (likely: string[], min: number, max: number, good = 12) =>
    fc.record({ value: num(min, max, good), unit: unit(likely, good) });
  const temperature = quantity(["degC", "degF", "K"], -50, 400, 40);
  const thread = fc.oneof(
    { arbitrary: fc.constantFrom("M12x1.5", "M10", "M9x1.25", "M6", "7/16-20", "1/2-13 UNC", "#10-32", "M24x2", "1-8"), weight: 12 },
    { arbitrary: fc.string(), weight: 1 },
  );

  // Counts results (not errors) per test, so that each fuzz test shows it reached the math.
  let computed = 0;
  beforeEach(() => {
    computed = 0;
  });
  afterEach(() => {
    expect(computed).toBeGreaterThan(100);
  });
  const expectSafe = (fn: () => unknown) => {
    let out: unknown;
    try {
      out = fn();
    } catch (e) {
      expect(e).toBeInstanceOf(ZodError);
      return;
    }
    computed++;
    expect(allFinite(out)).toBe(true);
  };

  test("calculatePreload", () => {
    const method = fc.oneof(
      fc.record({ kind: fc.constant("nut-factor"), k: num(0.01, 1) }),
      fc.record({ kind: fc.constant("friction"), muThread: num(0, 1), muHead: num(0, 1), headDiameter: quantity(["mm", "in"], 0.1, 60) }),
    );
    const input = fc.record(
      {
        thread,
        direction: fc.constantFrom("torque-to-preload", "preload-to-torque"),
        torque: quantity(["N.m", "ft.lbf", "in.lbf"], 0.01, 5000),
        preload: quantity(["N", "kN", "lbf"], 1, 1e6),
        method,
        material: fc.oneof(
          fc.record({ propertyClass: fc.constantFrom("8.8", "10.9", "12.9", "SAE-5", "SAE-8", "4.6", ...INHERITED_NAMES) }),
          fc.record({ yieldStrength: quantity(["MPa", "ksi", "psi"], 1, 2000) }),
        ),
        grip: fc.record({ length: quantity(["mm", "in"], 0.01, 500), modulus: quantity(["GPa"], 1, 400) }, { requiredKeys: ["length"] }),
      },
      { requiredKeys: ["thread", "method", "torque", "preload"] },
    );
    fc.assert(
      fc.property(input, (i) => expectSafe(() => calculatePreload(i as never))),
      { numRuns: 1500 },
    );
  });

  test("fitNutFactor", () => {
    const point = fc.record({ torque: quantity(["N.m", "ft.lbf"], 0.01, 2000, 60), preload: quantity(["N", "lbf", "kN"], 0.01, 1e6, 60) });
    fc.assert(
      fc.property(fc.array(point, { minLength: 0, maxLength: 8 }), thread, (points, t) =>
        expectSafe(() => fitNutFactor(points as never, t)),
      ),
      { numRuns: 1000 },
    );
  });

  test("calculateDistortion", () => {
    const good = 400;
    const length = (min: number, max: number) => quantity(["mm", "in"], min, max, good);
    const angle = fc.oneof(num(-720, 720, good), fc.constantFrom(0, 30, 45, 60, 90, 120, 135, 150, 180, 225, 270, 315));
    const depth = fc.oneof(length(0, 200), fc.constantFrom({ value: 10, unit: "mm" }, { value: 50, unit: "mm" }));
    const reading = fc.record(
      { depth, angleDeg: angle, diameter: length(0.1, 200), radius: length(0.05, 100) },
      { requiredKeys: ["depth", "angleDeg", "diameter", "radius"] },
    );
    const state = fc.record(
      {
        mode: fc.constantFrom("diametral", "radial"),
        readings: fc.array(reading, { minLength: 1, maxLength: 16 }),
        reference: length(1, 200),
      },
      { requiredKeys: ["readings"] },
    );
    const input = fc.record(
      {
        mode: fc.constantFrom("diametral", "radial"),
        readings: fc.array(reading, { minLength: 0, maxLength: 24 }),
        reference: length(1, 200),
        compareTo: state,
      },
      { requiredKeys: ["readings"] },
    );
    fc.assert(
      fc.property(input, (i) => expectSafe(() => calculateDistortion(i as never))),
      { numRuns: 1500 },
    );
  });

  test("calculateClearance", () => {
    const length = quantity(["mm", "in", "thou"], 0.001, 150, 100);
    const material = fc.oneof(
      fc.constantFrom("forged-2618", "forged-4032", "grey-cast-iron", "a356-t6", "cgi", "steel-4340", "nope", ...INHERITED_NAMES),
      fc.record({ alphaPerK: num(0, 1e-4, 40) }),
    );
    const spec = fc.record({ min: length, max: length }, { requiredKeys: [] });
    const input = fc.oneof(
      fc.record(
        {
          kind: fc.constant("piston-to-wall"),
          bore: length,
          piston: length,
          thermal: fc.record({
            ambient: temperature,
            boreTemperature: temperature,
            pistonTemperature: temperature,
            boreMaterial: material,
            pistonMaterial: material,
          }),
          spec,
        },
        { requiredKeys: ["kind", "bore", "piston"] },
      ),
      fc.record(
        { kind: fc.constant("bearing"), journal: length, bearingBore: length, housingBore: length, shellThickness: length, spec },
        { requiredKeys: ["kind", "journal"] },
      ),
      fc.record(
        { kind: fc.constant("ring-gap"), bore: length, gapPerBore: num(0.0001, 0.05, 40), measuredGap: length, spec },
        { requiredKeys: ["kind", "bore", "gapPerBore"] },
      ),
    );
    fc.assert(
      fc.property(input, (i) => expectSafe(() => calculateClearance(i as never))),
      { numRuns: 1500 },
    );
  });
});
