import { describe, expect, it } from "vitest";
import { presetText, readPastedPreset } from "./calc-preset";
import { checkCalculatorPreset, DEFAULT_PRESETS } from "./procedures/calc-presets";

describe("pasting a calculator page's copied inputs into a procedure's calculator block", () => {
  it("takes the copied preset's calculator and its input, which the block's own check accepts", () => {
    const copied = presetText("clearance", DEFAULT_PRESETS.clearance);
    const pasted = readPastedPreset(JSON.parse(copied));
    expect(pasted.ok && pasted.calculator).toBe("clearance");
    if (!pasted.ok) throw new Error(pasted.message);
    expect(checkCalculatorPreset("clearance", pasted.input)).toBeNull();
    // The whole `{ calculator, input }` object is not an input any block accepts: storing it as is was the bug.
    expect(checkCalculatorPreset("clearance", JSON.parse(copied))).not.toBeNull();
  });

  it("takes a bare input as it is, for the block's check to judge", () => {
    expect(readPastedPreset(DEFAULT_PRESETS.preload)).toEqual({ ok: true, input: DEFAULT_PRESETS.preload });
  });

  it("says what is wrong with a copied preset whose input does not fit its calculator", () => {
    const pasted = readPastedPreset({ calculator: "preload", input: { thread: 12 } });
    expect(pasted.ok).toBe(false);
    if (!pasted.ok) expect(pasted.message).toMatch(/do not fit their calculator/);
  });
});
