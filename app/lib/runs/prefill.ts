/**
 * A step's calculators fed with what was just measured in that step. The calculator keeps its
 * preset (thread, method, material…) and only its measured quantities are replaced; the math is
 * the procedure blocks' own (`runCalculator`, app/lib/calc), so a run shows the same numbers the
 * read page would for those inputs. Pure: the run screen recomputes as a number is typed.
 */
import { unitKind } from "~/lib/calc";
import { numericLeaves, runCalculator, setAtPath, type CalcOutcome } from "~/lib/procedures/calc-presets";
import type { RunCalculator } from "./steps";

export type StepValue = { label: string; quantity: string; value: number; unit: string };

export type Prefilled = {
  calculator: RunCalculator;
  /** Which inputs came from the run's entries, in words: "torque ← Head stud final torque". */
  filled: { input: string; from: string }[];
  outcome: CalcOutcome;
};

const words = (s: string) =>
  s
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter(Boolean);

/**
 * Each measured input of the preset (a value with a unit) takes the step's value of the same
 * quantity whose label names the input ("Piston skirt diameter" → piston, "Bore diameter" →
 * bore); when the step has exactly one value of that quantity and the preset one input of it,
 * that one. Anything else keeps the preset's value: a guess would be worse than the default.
 */
export function prefillCalculator(calculator: RunCalculator, values: StepValue[]): Prefilled {
  let preset: Record<string, unknown> = calculator.preset;
  const filled: Prefilled["filled"] = [];
  const leaves = numericLeaves(calculator.preset).filter((l) => l.unit && unitKind(l.unit));
  for (const leaf of leaves) {
    const kind = unitKind(leaf.unit as string);
    const sameKind = values.filter((v) => unitKind(v.unit) === kind && v.quantity === kind);
    const name = leaf.path.filter((p): p is string => typeof p === "string" && p !== "value").at(-1) ?? "";
    const byName = sameKind.filter((v) => name && words(v.label).includes(name.toLowerCase()));
    const leavesOfKind = leaves.filter((l) => unitKind(l.unit as string) === kind).length;
    const pick = byName.length === 1 ? byName[0] : sameKind.length === 1 && leavesOfKind === 1 ? sameKind[0] : null;
    if (!pick) continue;
    const at = leaf.path.slice(0, -1);
    preset = setAtPath(preset, at, { value: pick.value, unit: pick.unit });
    filled.push({ input: leaf.label, from: pick.label });
  }
  return { calculator: { ...calculator, preset }, filled, outcome: runCalculator(calculator.kind, preset) };
}
