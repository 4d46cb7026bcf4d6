import { describe, expect, it } from "vitest";
import type { JSONNode } from "./document";
import { readerBlocks } from "./reader-blocks";
import { diffBlocks, diffSpecs, summarize, type SpecRow } from "./diff";
import { extract } from "./extract";
import { slugify } from "./slug";

const A = "0b7f3d5e-1c44-4f7b-9a34-6f8d2e1a0c11";
const REC = "5eed0000-0000-4000-8000-00000000c1a9";

describe("extract", () => {
  it("pulls links (once each), specs with SI values, and video moments", () => {
    const doc: JSONNode = {
      type: "doc",
      content: [
        {
          type: "paragraph",
          content: [
            { type: "procedureLink", attrs: { procedureId: A } },
            { type: "procedureLink", attrs: { procedureId: A } },
          ],
        },
        {
          type: "spec",
          attrs: { id: "s1", label: "Torque", quantity: "torque", unit: "ft.lbf", nominal: 80, min: null, max: 85, note: "" },
        },
        {
          type: "spec",
          attrs: { id: "s2", label: "Piston-to-wall", quantity: "length", unit: "thou", nominal: null, min: 2.5, max: 3.0, note: "2618" },
        },
        { type: "caution", content: [{ type: "videoMoment", attrs: { recordingId: REC, start: 42, end: null, caption: "third pass" } }] },
      ],
    };
    const x = extract(doc);
    expect(x.links).toEqual([A]);
    expect(x.specs).toHaveLength(2);
    expect(x.specs[0]).toMatchObject({ specKey: "s1", unit: "ft.lbf", siUnit: "N.m", nominal: 80, minSi: null });
    // NIST SP 811 (2008), appendix B.9: 1 ft·lbf = 0.3048 m × 4.448 221 615 260 5 N (exact by definition).
    expect(x.specs[0].nominalSi).toBeCloseTo(80 * 0.3048 * 4.4482216152605, 9);
    expect(x.specs[1].minSi).toBeCloseTo(2.5 * 0.0000254, 12);
    expect(x.specs[1].siUnit).toBe("m");
    expect(x.moments).toEqual([{ position: 0, recordingId: REC, startS: 42, endS: null, caption: "third pass" }]);
  });
});

const spec = (k: string, over: Partial<SpecRow> = {}): SpecRow => ({
  specKey: k,
  label: `Spec ${k}`,
  quantity: "torque",
  unit: "N.m",
  nominal: 100,
  min: 95,
  max: 105,
  note: "",
  ...over,
});

describe("diffSpecs", () => {
  it("reports added, removed, changed (with the fields) and unchanged specs", () => {
    const before = [spec("a"), spec("b"), spec("c")];
    const after = [spec("a"), spec("b", { max: 108, note: "moly" }), spec("d")];
    const d = diffSpecs(before, after);
    expect(d.find((x) => x.kind === "unchanged")).toMatchObject({ after: { specKey: "a" } });
    expect(d.find((x) => x.kind === "changed")).toMatchObject({ fields: ["max", "note"] });
    expect(d.find((x) => x.kind === "added")).toMatchObject({ after: { specKey: "d" } });
    expect(d.find((x) => x.kind === "removed")).toMatchObject({ before: { specKey: "c" } });
  });

  it("matches a re-created spec by its label", () => {
    const d = diffSpecs([spec("old", { label: "Final torque" })], [spec("new", { label: "final torque ", unit: "ft.lbf" })]);
    expect(d).toHaveLength(1);
    expect(d[0]).toMatchObject({ kind: "changed", fields: ["label", "unit"] });
  });
});

describe("diffBlocks", () => {
  const doc = (...texts: string[]): JSONNode => ({
    type: "doc",
    content: texts.map((t) => ({ type: "paragraph", content: [{ type: "text", text: t }] })),
  });
  const steps = (...texts: string[]): JSONNode => ({
    type: "doc",
    content: [
      {
        type: "orderedList",
        attrs: { start: 1 },
        content: texts.map((t) => ({ type: "listItem", content: [{ type: "paragraph", content: [{ type: "text", text: t }] }] })),
      },
    ],
  });
  it("shows word changes inside a changed block, and whole added or removed blocks", () => {
    const d = diffBlocks(
      readerBlocks(doc("Clean the threads.", "Torque to 100 N·m in three passes.", "Check the gasket.")),
      readerBlocks(doc("Clean the threads.", "Torque to 110 N·m in three passes.", "Mark each stud.")),
    );
    expect(d[0]).toEqual({ op: "same", block: { kind: "paragraph", text: "Clean the threads." } });
    expect(d[1].op).toBe("change");
    if (d[1].op === "change") {
      expect(d[1].pieces.filter((p) => p.op === "del").map((p) => p.text.trim())).toContain("100");
      expect(d[1].pieces.filter((p) => p.op === "add").map((p) => p.text.trim())).toContain("110");
    }
    expect(summarize(d)).toEqual({ added: 0, removed: 0, changed: 2 });
    const add = diffBlocks(readerBlocks(doc("A.")), readerBlocks(doc("A.", "B.")));
    expect(add).toEqual([
      { op: "same", block: { kind: "paragraph", text: "A." } },
      { op: "add", block: { kind: "paragraph", text: "B." } },
    ]);
  });

  it("a step inserted at the top is one added step, not every later step renumbered", () => {
    const d = diffBlocks(
      readerBlocks(steps("Clean the threads.", "Oil the studs.")),
      readerBlocks(steps("Chase the threads.", "Clean the threads.", "Oil the studs.")),
    );
    expect(d.map((c) => c.op)).toEqual(["add", "same", "same"]);
    expect(d.map((c) => c.block.marker)).toEqual(["1.", "2.", "3."]);
  });

  it("a changed figure is marked whole: 0.15 → 0.18, not the digits after the point", () => {
    const [c] = diffBlocks(readerBlocks(doc("Assume K = 0.15 for moly.")), readerBlocks(doc("Assume K = 0.18 for moly.")));
    expect(c.op === "change" && c.pieces).toEqual([
      { op: "same", text: "Assume K = " },
      { op: "del", text: "0.15" },
      { op: "add", text: "0.18" },
      { op: "same", text: " for moly." },
    ]);
  });

  it("a rewritten phrase is struck through once and followed by the new one, not word by word", () => {
    const [c] = diffBlocks(
      readerBlocks(doc("K = 0.15, the usual figure for moly paste.")),
      readerBlocks(doc("K = 0.18, the nut factor our clamp-load test fits for moly paste.")),
    );
    expect(c.op === "change" && c.pieces).toEqual([
      { op: "same", text: "K = " },
      { op: "del", text: "0.15" },
      { op: "add", text: "0.18" },
      { op: "same", text: ", the " },
      { op: "del", text: "usual figure" },
      { op: "add", text: "nut factor our clamp-load test fits" },
      { op: "same", text: " for moly paste." },
    ]);
  });

  it("a heading that became a paragraph is removed and added, not a word change", () => {
    const h: JSONNode = { type: "doc", content: [{ type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "Why" }] }] };
    const d = diffBlocks(readerBlocks(h), readerBlocks(doc("Why")));
    expect(d.map((c) => [c.op, c.block.kind])).toEqual([
      ["del", "heading"],
      ["add", "paragraph"],
    ]);
  });
});

describe("slugify", () => {
  it("makes stable ASCII slugs", () => {
    expect(slugify("Head stud installation — M12×1.5, moly")).toBe("head-stud-installation-m12x1-5-moly");
    expect(slugify("Tomás' piston-to-wall check")).toBe("tomas-piston-to-wall-check");
    expect(slugify("!!!")).toBe("procedure");
  });
});
