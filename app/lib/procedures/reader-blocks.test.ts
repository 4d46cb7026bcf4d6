import { describe, expect, it } from "vitest";
import { DEFAULT_PRESETS } from "./calc-presets";
import type { JSONNode } from "./document";
import { presetWords, readerBlocks, specLimitsText } from "./reader-blocks";

const t = (text: string): JSONNode => ({ type: "text", text });
const p = (text: string): JSONNode => ({ type: "paragraph", content: [t(text)] });
const LINKED = "0b7f3d5e-1c44-4f7b-9a34-6f8d2e1a0c11";

describe("readerBlocks", () => {
  it("reads a page as its reader does: headings without markup, numbered steps, bullets, cautions, links by title", () => {
    const doc: JSONNode = {
      type: "doc",
      content: [
        { type: "heading", attrs: { level: 2 }, content: [t("Why")] },
        { type: "paragraph", content: [t("See "), { type: "procedureLink", attrs: { procedureId: LINKED } }] },
        {
          type: "orderedList",
          attrs: { start: 3 },
          content: [
            { type: "listItem", content: [p("Clean the threads."), p("Blow out the holes.")] },
            {
              type: "listItem",
              content: [p("Oil the studs."), { type: "bulletList", content: [{ type: "listItem", content: [p("moly on the nut face")] }] }],
            },
          ],
        },
        { type: "caution", content: [p("Never reuse a torque-to-yield stud.")] },
        {
          type: "table",
          content: [
            {
              type: "tableRow",
              content: [
                { type: "tableHeader", content: [p("Cyl")] },
                { type: "tableHeader", content: [p("Bore")] },
              ],
            },
            {
              type: "tableRow",
              content: [
                { type: "tableCell", content: [p("1")] },
                { type: "tableCell", content: [p("88.006")] },
              ],
            },
          ],
        },
      ],
    };
    const b = readerBlocks(doc, { titleOf: (id) => (id === LINKED ? "Deck flatness check" : undefined) });
    expect(b[0]).toEqual({ kind: "heading", level: 2, text: "Why" });
    expect(b[1]).toEqual({ kind: "paragraph", text: "See Deck flatness check" });
    expect(b.slice(2, 6).map((x) => [x.marker ?? "", x.depth, x.text])).toEqual([
      ["3.", 0, "Clean the threads."],
      ["", 0, "Blow out the holes."],
      ["4.", 0, "Oil the studs."],
      ["•", 1, "moly on the nut face"],
    ]);
    expect(b[6]).toEqual({ kind: "paragraph", caution: true, text: "Never reuse a torque-to-yield stud." });
    expect(b.slice(7).map((x) => [x.kind, x.header, x.text])).toEqual([
      ["row", true, "Cyl | Bore"],
      ["row", false, "1 | 88.006"],
    ]);
    expect(b.map((x) => x.text).join(" ")).not.toMatch(/##|•|→/);
  });

  it("shows specs with their unit signs and limits, and a video moment with its time and recording", () => {
    const doc: JSONNode = {
      type: "doc",
      content: [
        {
          type: "spec",
          attrs: {
            id: "s1",
            label: "Head stud final torque",
            quantity: "torque",
            unit: "N.m",
            nominal: 100,
            min: 95,
            max: 105,
            note: "moly",
          },
        },
        {
          type: "spec",
          attrs: { id: "s2", label: "Stud stretch", quantity: "length", unit: "thou", nominal: null, min: 5.5, max: null, note: "" },
        },
        { type: "videoMoment", attrs: { recordingId: "5eed0000-0000-4000-8000-00000000c1a9", start: 83, end: 100, caption: "third pass" } },
      ],
    };
    const b = readerBlocks(doc, { recordingOf: () => "Head studs on the bench" });
    expect(b[0]).toEqual({ kind: "spec", title: "Head stud final torque", text: "100 N·m (95–105 N·m) — moly" });
    expect(b[1].text).toBe("min 5.5 thou");
    expect(b[2]).toEqual({ kind: "moment", title: "Video moment", text: "1:23–1:40 · third pass · from “Head studs on the bench”" });
  });

  it("puts a calculator's settings in words", () => {
    const doc: JSONNode = {
      type: "doc",
      content: [{ type: "calculator", attrs: { kind: "preload", title: "Head studs", preset: DEFAULT_PRESETS.preload } }],
    };
    const [c] = readerBlocks(doc);
    expect(c.title).toBe("Preload calculator — Head studs");
    expect(c.text).toBe("Thread M12x1.5, torque → preload, torque 110 N·m, nut factor K 0.15, property class 12.9");
    expect(c.text).not.toMatch(/propertyClass|torque-to-preload|N\.m/);
  });
});

describe("presetWords", () => {
  it("reads the friction method, grip and the reverse direction", () => {
    const w = presetWords("preload", {
      thread: "7/16-20",
      direction: "preload-to-torque",
      preload: { value: 9000, unit: "lbf" },
      method: { kind: "friction", muThread: 0.12, muHead: 0.14, headDiameter: { value: 0.65, unit: "in" } },
      material: { yieldStrength: { value: 190, unit: "ksi" } },
      grip: { length: { value: 3.1, unit: "in" } },
    });
    expect(w).toBe(
      "Thread 7/16-20, preload → torque, preload 9000 lbf, friction method (ISO 16047), thread friction μ 0.12, head friction μ 0.14, head bearing diameter 0.65 in, yield strength 190 ksi, grip length 3.1 in",
    );
  });

  it("groups bore readings by depth and names clearance materials and temperatures", () => {
    expect(presetWords("distortion", DEFAULT_PRESETS.distortion)).toBe(
      "Diameters measured, reference bore 88 mm, diameter at 10 mm deep: 0° 88.006 mm, 45° 88.012 mm, 90° 88.009 mm, 135° 88.003 mm",
    );
    const w = presetWords("clearance", {
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      thermal: {
        ambient: { value: 20, unit: "degC" },
        boreTemperature: { value: 90, unit: "degC" },
        pistonTemperature: { value: 150, unit: "degC" },
        boreMaterial: "grey-cast-iron",
        pistonMaterial: "forged-2618",
      },
      spec: { min: { value: 0.05, unit: "mm" }, max: { value: 0.08, unit: "mm" } },
    });
    expect(w).toMatch(
      /^Piston-to-wall, bore 88 mm, piston 87.93 mm, ambient 20 °C, bore at 90 °C, piston at 150 °C, bore material .+, piston material Forged aluminium 2618 \(piston\), spec 0.05–0.08 mm$/,
    );
  });
});

describe("specLimitsText", () => {
  it("prints nominal with the band, or the one limit there is", () => {
    expect(specLimitsText({ nominal: 80, min: null, max: 85, unit: "ft.lbf" })).toBe("80 ft·lbf max 85 ft·lbf");
    expect(specLimitsText({ nominal: null, min: 0.05, max: 0.08, unit: "mm" })).toBe("0.05–0.08 mm");
  });
});
