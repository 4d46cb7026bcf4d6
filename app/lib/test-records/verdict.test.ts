import { describe, expect, it } from "vitest";
import {
  evaluateRecord,
  openPlaces,
  readingVerdict,
  recordVerdictText,
  specVerdict,
  specVerdictText,
  VerdictInputError,
  withEmptyPlaces,
  type SpecLimits,
} from "./verdict";

const bore: SpecLimits = { id: "bore", label: "Bore diameter", quantity: "length", unit: "mm", min: 88.0, max: 88.012, nominal: 88.006 };
const ringGap: SpecLimits = { id: "gap", label: "Top ring end gap", quantity: "length", unit: "mm", min: 0.45, max: null };
const oor: SpecLimits = { id: "oor", label: "Out-of-round", quantity: "length", unit: "mm", min: null, max: 0.005 };
const torque: SpecLimits = { id: "tq", label: "Head stud final torque", quantity: "torque", unit: "N.m", min: 105, max: 115 };

describe("readingVerdict", () => {
  it("treats both bounds as inclusive", () => {
    expect(readingVerdict(bore, { value: 88.0, unit: "mm" }).verdict).toBe("within");
    expect(readingVerdict(bore, { value: 88.012, unit: "mm" }).verdict).toBe("within");
    expect(readingVerdict(bore, { value: 87.999, unit: "mm" }).verdict).toBe("below");
    expect(readingVerdict(bore, { value: 88.013, unit: "mm" }).verdict).toBe("above");
  });

  it("converts the reading into the spec's unit before comparing", () => {
    // 3.4650 in = 88.011 mm (1 in = 25.4 mm exactly): within; 3.4655 in = 88.0237 mm: above.
    const r = readingVerdict(bore, { value: 3.465, unit: "in" });
    expect(r.valueInSpecUnit).toBeCloseTo(88.011, 9);
    expect(r.verdict).toBe("within");
    expect(readingVerdict(bore, { value: 3.4655, unit: "in" }).verdict).toBe("above");
    // 81.1 ft·lbf = 109.96 N·m (1 ft·lbf = 1.3558179483314004 N·m): within 105–115.
    expect(readingVerdict(torque, { value: 81.1, unit: "ft.lbf" }).valueInSpecUnit).toBeCloseTo(109.9568, 3);
    expect(readingVerdict(torque, { value: 81.1, unit: "ft.lbf" }).verdict).toBe("within");
    expect(readingVerdict(torque, { value: 90, unit: "ft.lbf" }).verdict).toBe("above");
  });

  it("keeps a bound inclusive when the reading is typed in another unit (no rounding surprise)", () => {
    const thouSpec: SpecLimits = { id: "ptw", label: "Piston-to-wall", quantity: "length", unit: "mm", min: 0.0254, max: 0.0762 };
    expect(readingVerdict(thouSpec, { value: 1, unit: "thou" }).verdict).toBe("within");
    expect(readingVerdict(thouSpec, { value: 3, unit: "thou" }).verdict).toBe("within");
    expect(readingVerdict(thouSpec, { value: 3.01, unit: "thou" }).verdict).toBe("above");
  });

  it("checks a min-only spec against its min alone", () => {
    expect(readingVerdict(ringGap, { value: 0.45, unit: "mm" }).verdict).toBe("within");
    expect(readingVerdict(ringGap, { value: 2, unit: "mm" }).verdict).toBe("within");
    expect(readingVerdict(ringGap, { value: 0.44, unit: "mm" }).verdict).toBe("below");
  });

  it("checks a max-only spec against its max alone", () => {
    expect(readingVerdict(oor, { value: 0, unit: "mm" }).verdict).toBe("within");
    expect(readingVerdict(oor, { value: 5, unit: "um" }).verdict).toBe("within");
    expect(readingVerdict(oor, { value: 6, unit: "um" }).verdict).toBe("above");
  });

  it("leaves a spec without limits unchecked rather than passing it", () => {
    const nominalOnly: SpecLimits = { id: "n", label: "Deck height", quantity: "length", unit: "mm", min: null, max: null, nominal: 210 };
    expect(readingVerdict(nominalOnly, { value: 300, unit: "mm" }).verdict).toBe("unchecked");
  });

  it("refuses a unit of another kind and an unknown unit with a message for the field", () => {
    expect(() => readingVerdict(bore, { value: 88, unit: "N.m" })).toThrow(VerdictInputError);
    expect(() => readingVerdict(bore, { value: 88, unit: "furlong" })).toThrow(/not a unit/);
    try {
      readingVerdict(bore, { value: Number.NaN, unit: "mm" });
      expect.unreachable();
    } catch (err) {
      expect((err as VerdictInputError).field).toBe("value");
    }
  });
});

describe("specVerdict and evaluateRecord", () => {
  it("a spec is out when any one of its readings is out", () => {
    expect(specVerdict(["within", "within", "above"])).toBe("out");
    expect(specVerdict(["within", "within"])).toBe("within");
    expect(specVerdict([])).toBe("not-measured");
  });

  it("is within when every spec was measured and each is within", () => {
    const e = evaluateRecord([bore, ringGap, oor], {
      bore: [88.004, 88.006, 88.008, 88.011].map((value) => ({ value, unit: "mm" })),
      gap: [{ value: 0.5, unit: "mm" }],
      oor: [{ value: 0.004, unit: "mm" }],
    });
    expect(e.verdict).toBe("within");
    expect(e.notMeasured).toEqual([]);
    expect(recordVerdictText(e.verdict!, e.notMeasured.length)).toBe("Within spec");
  });

  it("is incomplete, never within, when a spec was left unmeasured, and lists it as not measured", () => {
    const e = evaluateRecord([bore, ringGap, oor], {
      bore: [88.004, 88.006, 88.008, 88.011].map((value) => ({ value, unit: "mm" })),
      gap: [{ value: 0.5, unit: "mm" }],
    });
    expect(e.verdict).toBe("incomplete");
    expect(recordVerdictText(e.verdict!, e.notMeasured.length)).toBe("Incomplete: 1 spec not measured");
    expect(e.notMeasured.map((s) => s.id)).toEqual(["oor"]);
    expect(e.specs.find((s) => s.spec.id === "oor")!.verdict).toBe("not-measured");
    expect(e.counts).toEqual({ within: 2, out: 0, notMeasured: 1, missingPlaces: 0 });
  });

  it("is out when one reading of one spec is out", () => {
    const e = evaluateRecord([bore, ringGap], {
      bore: [
        { value: 88.006, unit: "mm" },
        { value: 88.015, unit: "mm" },
      ],
      gap: [{ value: 0.5, unit: "mm" }],
    });
    expect(e.verdict).toBe("out");
    expect(e.specs[0].readings.map((r) => r.verdict)).toEqual(["within", "above"]);
    expect(e.counts.out).toBe(1);
  });

  it("stays out of spec when a reading is out and another spec was not measured, and says both", () => {
    const e = evaluateRecord([bore, ringGap, oor], { bore: [{ value: 88.015, unit: "mm" }] });
    expect(e.verdict).toBe("out");
    expect(recordVerdictText(e.verdict!, e.notMeasured.length)).toBe("Out of spec; 2 specs not measured");
  });

  const atCyl = (cylinder: number, value: number) => ({ value, unit: "mm", position: { cylinder } });

  it("is incomplete, never within, when a run left places of a measured spec empty, and names them", () => {
    const e = evaluateRecord([bore, ringGap], { bore: [atCyl(1, 88.004), atCyl(2, 88.006)], gap: [{ value: 0.5, unit: "mm" }] }, [
      { specId: "bore", cylinder: 4 },
      { specId: "bore", cylinder: 3 },
    ]);
    expect(e.verdict).toBe("incomplete");
    expect(e.notMeasured).toEqual([]);
    expect(e.missingPlaces).toEqual([
      { specId: "bore", fastener: null, cylinder: 3, journal: null, field: "cylinder", n: 3, label: "Cyl 3" },
      { specId: "bore", fastener: null, cylinder: 4, journal: null, field: "cylinder", n: 4, label: "Cyl 4" },
    ]);
    // The places it lists are a form's input again (the amend form's preview): still open by the same rule.
    expect(openPlaces(e.missingPlaces, { bore: [atCyl(1, 88.004)] })).toHaveLength(2);
    expect(recordVerdictText(e.verdict!, e.counts.notMeasured, e.counts.missingPlaces)).toBe("Incomplete: 2 places not measured");
  });

  it("clears a place a reading at that place fills, and keeps the others", () => {
    const e = evaluateRecord([bore], { bore: [atCyl(1, 88.004), atCyl(3, 88.006)] }, [
      { specId: "bore", cylinder: 3 },
      { specId: "bore", cylinder: 4 },
    ]);
    expect(e.missingPlaces.map((p) => p.label)).toEqual(["Cyl 4"]);
    expect(openPlaces([{ specId: "bore", cylinder: 3 }], { bore: [atCyl(3, 88.0)] })).toEqual([]);
    const filled = evaluateRecord([bore], { bore: [atCyl(1, 88.004), atCyl(3, 88.006), atCyl(4, 88.008)] }, [
      { specId: "bore", cylinder: 3 },
      { specId: "bore", cylinder: 4 },
    ]);
    expect(filled.verdict).toBe("within");
  });

  it("counts a spec with no reading once, not again for its places, and says specs and places apart", () => {
    const e = evaluateRecord([bore, ringGap, oor], { bore: [atCyl(1, 88.004)], gap: [{ value: 0.5, unit: "mm" }] }, [
      { specId: "bore", cylinder: 2 },
      { specId: "bore", cylinder: 3 },
      { specId: "oor", cylinder: 2 },
    ]);
    expect(e.counts).toEqual({ within: 2, out: 0, notMeasured: 1, missingPlaces: 2 });
    expect(recordVerdictText(e.verdict!, e.counts.notMeasured, e.counts.missingPlaces)).toBe(
      "Incomplete: 1 spec and 2 places not measured",
    );
  });

  it("says a spec whose readings are all within but has a place left empty is within so far, not within spec", () => {
    const e = evaluateRecord([bore, ringGap], { bore: [atCyl(1, 88.004), atCyl(2, 88.006)], gap: [{ value: 0.5, unit: "mm" }] }, [
      { specId: "bore", cylinder: 3 },
    ]);
    const [b, g] = e.specs;
    expect([b.verdict, b.emptyPlaces, g.emptyPlaces]).toEqual(["within", 1, 0]);
    expect(specVerdictText(b.verdict, b.emptyPlaces)).toBe("Within spec so far; 1 place not measured");
    expect(specVerdictText(g.verdict, g.emptyPlaces)).toBe("Within spec");
    expect(specVerdictText("out", 2)).toBe("Out of spec; 2 places not measured");
    expect(specVerdictText("unchecked", 1)).toBe("Recorded so far; 1 place not measured");
    // A spec with no reading at all is "Not measured" and its places are not counted again.
    expect(specVerdictText("not-measured", 3)).toBe("Not measured");
  });

  it("says one place and one spec in the singular, and stays out of spec with places missing", () => {
    expect(recordVerdictText("incomplete", 0, 1)).toBe("Incomplete: 1 place not measured");
    expect(recordVerdictText("incomplete", 2, 1)).toBe("Incomplete: 2 specs and 1 place not measured");
    expect(recordVerdictText("out", 0, 3)).toBe("Out of spec; 3 places not measured");
    expect(recordVerdictText("within")).toBe("Within spec");
  });

  it("lists each place left empty among the readings where its number falls", () => {
    const rs = [1, 2, 4].map((cylinder) => ({ id: `r${cylinder}`, cylinder }));
    const order = (empty: { field: "cylinder"; n: number }[]) =>
      withEmptyPlaces(rs, empty).map((x) => ("r" in x ? x.r.id : `empty ${x.place.n}`));
    expect(order([{ field: "cylinder", n: 3 }])).toEqual(["r1", "r2", "empty 3", "r4"]);
    expect(order([{ field: "cylinder", n: 5 }])).toEqual(["r1", "r2", "r4", "empty 5"]);
    const from2 = [2, 3].map((cylinder) => ({ id: `r${cylinder}`, cylinder }));
    expect(withEmptyPlaces(from2, [{ field: "cylinder", n: 1 }]).map((x) => ("r" in x ? x.r.id : "empty 1"))).toEqual([
      "empty 1",
      "r2",
      "r3",
    ]);
  });

  it("has no verdict at all when nothing was measured", () => {
    const e = evaluateRecord([bore, oor], {});
    expect(e.verdict).toBeNull();
    expect(e.notMeasured).toHaveLength(2);
  });
});
