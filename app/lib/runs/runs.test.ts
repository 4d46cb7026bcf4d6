import { evaluate } from "mathjs";
import { describe, expect, it } from "vitest";
import type { JSONNode } from "~/lib/procedures/document";
import { entriesBodySchema, entrySchema, latestByPlace, placesBySpec, progressOf, runPlaceField } from "./entries";
import { prefillCalculator } from "./prefill";
import { runSteps, stepTitle } from "./steps";

const t = (text: string): JSONNode => ({ type: "text", text });
const p = (text: string): JSONNode => ({ type: "paragraph", content: [t(text)] });
const h = (text: string): JSONNode => ({ type: "heading", attrs: { level: 2 }, content: [t(text)] });
const caution = (text: string): JSONNode => ({ type: "caution", content: [p(text)] });
const list = (...items: string[]): JSONNode => ({
  type: "orderedList",
  attrs: { start: 1 },
  content: items.map((i) => ({ type: "listItem", content: [p(i)] })),
});
const spec = (id: string): JSONNode => ({
  type: "spec",
  attrs: { id, label: id, quantity: "length", unit: "mm", nominal: 1, min: 0, max: 2, note: "" },
});
const calc = (kind: string, preset: Record<string, unknown>): JSONNode => ({ type: "calculator", attrs: { kind, title: "t", preset } });

describe("runSteps", () => {
  const doc: JSONNode = {
    type: "doc",
    content: [
      caution("Makers' values first."),
      h("Why"),
      p("Because the clamp must be even."),
      h("Steps"),
      p("Work centre out."),
      list("Chase the threads.", "Pass 1.", "Final pass."),
      spec("final"),
      spec("protrusion"),
      calc("preload", {}),
      caution("Never re-torque a yielded stud."),
      h("Checks"),
      spec("deck"),
    ],
  };
  const steps = runSteps(doc);

  it("makes each numbered item a step and a section without a list one step", () => {
    expect(steps.map(stepTitle)).toEqual(["Why", "Step 1", "Step 2", "Step 3", "Checks"]);
    // Only a section called Steps drops its name; another keeps it beside the step's number.
    expect(stepTitle({ section: "Assembly", number: "2" })).toBe("Assembly · step 2");
  });

  it("gives the text before the list to the first step and the specs and calculators after it to the last", () => {
    expect(steps[1].text).toEqual(["Work centre out.", "Chase the threads."]);
    expect(steps[3].specKeys).toEqual(["final", "protrusion"]);
    expect(steps[3].calculators.map((c) => c.kind)).toEqual(["preload"]);
    expect(steps[2].specKeys).toEqual([]);
    expect(steps[4].specKeys).toEqual(["deck"]);
  });

  it("puts the procedure's leading cautions and the section's own in front of every step of the section", () => {
    expect(steps[0].cautions).toEqual(["Makers' values first."]);
    for (const s of steps.slice(1, 4)) expect(s.cautions).toEqual(["Makers' values first.", "Never re-torque a yielded stud."]);
    expect(steps[4].cautions).toEqual(["Makers' values first."]);
  });

  it("numbers the steps from the list's start", () => {
    const s = runSteps({ type: "doc", content: [h("A"), { ...list("x", "y"), attrs: { start: 4 } }] });
    expect(s.map((x) => x.number)).toEqual(["4", "5"]);
  });
});

describe("prefillCalculator", () => {
  it("feeds piston-to-wall with the bore and piston sizes typed in the step, by the words of their labels", () => {
    const out = prefillCalculator(
      {
        kind: "clearance",
        title: "PTW",
        preset: { kind: "piston-to-wall", bore: { value: 88, unit: "mm" }, piston: { value: 87.93, unit: "mm" } },
      },
      [
        { label: "Piston skirt diameter", quantity: "length", value: 87.95, unit: "mm" },
        { label: "Bore diameter", quantity: "length", value: 88.006, unit: "mm" },
      ],
    );
    expect(out.filled.map((f) => f.from).sort()).toEqual(["Bore diameter", "Piston skirt diameter"]);
    expect(out.outcome.ok).toBe(true);
    // Diametral clearance is bore minus piston (definition); checked with mathjs: 88.006 mm - 87.95 mm.
    const expected = evaluate("88.006 mm - 87.95 mm").toNumber("mm");
    if (out.outcome.ok) expect(out.outcome.rows[0].value).toContain(`${expected.toFixed(3)} mm`);
  });

  it("feeds the preload calculator the torque just typed (the only torque of the step)", () => {
    const preset = {
      thread: "M12x1.5",
      direction: "torque-to-preload",
      torque: { value: 100, unit: "N.m" },
      method: { kind: "nut-factor", k: 0.18 },
      material: { propertyClass: "12.9" },
    };
    const out = prefillCalculator({ kind: "preload", title: "Studs", preset }, [
      { label: "Head stud final torque", quantity: "torque", value: 110, unit: "N.m" },
    ]);
    expect(out.filled).toHaveLength(1);
    // Short-form torque relation T = K·F·d (Shigley's Mechanical Engineering Design, eq. 8-27), so
    // F = T / (K·d); evaluated with mathjs: 110 N·m / (0.18 × 12 mm) = 50.93 kN.
    const kN = evaluate("110 N m / (0.18 * 12 mm)").toNumber("kN");
    if (out.outcome.ok) expect(out.outcome.rows[0].value).toBe(`${kN.toFixed(2)} kN`);
    else throw new Error(out.outcome.message);
  });

  it("keeps the preset's value when two entries could fill one input and neither label names it", () => {
    const preset = { kind: "piston-to-wall", bore: { value: 88, unit: "mm" }, piston: { value: 87.93, unit: "mm" } };
    const out = prefillCalculator({ kind: "clearance", title: "PTW", preset }, [
      { label: "Size A", quantity: "length", value: 1, unit: "mm" },
      { label: "Size B", quantity: "length", value: 2, unit: "mm" },
    ]);
    expect(out.filled).toEqual([]);
    expect(out.calculator.preset).toEqual(preset);
  });
});

describe("entries", () => {
  const base = { key: "k-123456789", specKey: "final", value: 110, unit: "N.m", decimals: 0, typedAt: "2026-03-02T10:00:00.000Z" };

  it("takes a well-formed entry and refuses unknown units, values no gauge reads and bad keys", () => {
    expect(entrySchema.safeParse(base).success).toBe(true);
    expect(entrySchema.safeParse({ ...base, unit: "furlong" }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, value: 1e300 }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, key: "short" }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, key: "has space 12345" }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, value: null }).success).toBe(true);
  });

  it("needs entries or a step in a body", () => {
    expect(entriesBodySchema.safeParse({ entries: [] }).success).toBe(false);
    expect(entriesBodySchema.safeParse({ step: 3 }).success).toBe(true);
  });

  it("keeps the latest typing per spec, whenever it arrived, and counts a cleared value as open", () => {
    const latest = latestByPlace([
      { specKey: "a", typedAt: "2026-03-02T10:00:05Z", receivedOrder: 1, valueEntered: 2 as number | null },
      { specKey: "a", typedAt: "2026-03-02T10:00:01Z", receivedOrder: 2, valueEntered: 1 },
      { specKey: "b", typedAt: "2026-03-02T10:00:00Z", receivedOrder: 3, valueEntered: 5 },
      { specKey: "b", typedAt: "2026-03-02T10:00:00Z", receivedOrder: 4, valueEntered: null },
    ]);
    expect(latest.get("a")?.valueEntered).toBe(2);
    expect(latest.get("b")?.valueEntered).toBeNull();
    const once = (key: string) => ({ key, quantity: "temperature", label: key });
    expect(progressOf(placesBySpec([once("a"), once("b"), once("c")], { cylinders: null, mainJournals: null }, latest))).toEqual({
      measured: 1,
      total: 3,
    });
  });

  it("takes a place the spec is measured at, one at a time, and refuses other fields", () => {
    expect(entrySchema.safeParse({ ...base, position: { fastener: 7 } }).success).toBe(true);
    expect(entrySchema.safeParse({ ...base, position: { cylinder: 0 } }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, position: { cylinder: 2.5 } }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, position: { depth: 20 } }).success).toBe(false);
    expect(entrySchema.safeParse({ ...base, position: { cylinder: 1, journal: 1 } }).success).toBe(false);
  });

  it("works a bore per cylinder, a bearing per journal, a torque per stud and a temperature once", () => {
    expect(runPlaceField({ quantity: "length", label: "Bore diameter" })).toBe("cylinder");
    expect(runPlaceField({ quantity: "length", label: "Main bearing clearance" })).toBe("journal");
    expect(runPlaceField({ quantity: "torque", label: "Head stud final torque" })).toBe("fastener");
    expect(runPlaceField({ quantity: "temperature", label: "Oil temperature" })).toBeNull();
  });

  it("keeps the latest value per spec and place, and offers every cylinder of the engine and studs up to the highest typed", () => {
    const e = (specKey: string, at: Record<string, number>, valueEntered: number | null, s: number, order: number) => ({
      specKey,
      ...at,
      valueEntered,
      typedAt: `2026-03-02T10:00:${String(s).padStart(2, "0")}Z`,
      receivedOrder: order,
    });
    const latest = latestByPlace([
      e("bore", { cylinder: 1 }, 88.004, 1, 1),
      e("bore", { cylinder: 1 }, 88.006, 2, 2), // retyped: the later one is cylinder 1's value
      e("bore", { cylinder: 2 }, 88.005, 3, 3),
      e("torque", { fastener: 1 }, 110, 4, 4),
      e("torque", { fastener: 3 }, 111, 5, 5), // stud 2 skipped
    ]);
    expect(latest.get("bore@cylinder1")?.valueEntered).toBe(88.006);
    const places = placesBySpec(
      [
        { key: "bore", quantity: "length", label: "Bore diameter" },
        { key: "torque", quantity: "torque", label: "Head stud final torque" },
      ],
      { cylinders: 4, mainJournals: 5 },
      latest,
    );
    expect(places[0]).toMatchObject({ field: "cylinder", offered: [1, 2, 3, 4], missing: [3, 4] });
    expect(places[1]).toMatchObject({ field: "fastener", offered: [1, 2, 3], missing: [2] });
    // Hand count: cylinders 1, 2 of 4 and studs 1, 3 of 3 → 4 of 7 places.
    expect(progressOf(places)).toEqual({ measured: 4, total: 7 });
  });
});
