/**
 * What the Preload page shows of a result, worked out apart from how it is drawn: how close the
 * stress runs to yield (past 90 % it is out of spec), the clamp load at yield and the limits it
 * gives, where the torque goes, and the edits that keep related fields in step (a thread
 * condition fills its nut factor; results follow the unit system of what was typed).
 */
import { NUT_FACTOR_PRESETS, type PreloadResult } from "~/lib/calc";
import type { FormValues } from "./outcome";
import type { PreloadOutcome } from "./preload-form";
import { followInputSystem, unitOr } from "./units";

/** Past this share of the minimum yield the result is out of spec (red): little margin is left for the scatter of friction. */
export const YIELD_LIMIT_PERCENT = 90;

/** The clamp load at which the thread's stress reaches the material's yield, when a material is given (N). */
export function yieldForceOf(r: PreloadResult): number | undefined {
  const pct = r.percentOfYield;
  return pct !== undefined ? (r.stress_MPa / (pct / 100)) * r.thread.stressArea_mm2 : undefined;
}

export const overYieldLimit = (r: PreloadResult): boolean => (r.percentOfYield ?? 0) > YIELD_LIMIT_PERCENT;

/** The limits for this thread at the model's torque per clamp load: at yield, at the limit, and the torque for the limit (SI). */
export function yieldLimits(r: PreloadResult, yieldForce_N: number) {
  const share = YIELD_LIMIT_PERCENT / 100;
  return {
    atYield_N: yieldForce_N,
    atLimit_N: share * yieldForce_N,
    torqueForLimit_Nm: share * yieldForce_N * (r.torque_Nm / r.preload_N),
  };
}

/** The friction model's split of the torque, each part with its share of the whole (%). */
export function torqueShares(r: PreloadResult): { what: string; torque_Nm: number; percent: number }[] {
  const s = r.torqueSplit;
  if (!s) return [];
  return [
    { what: "Stretching the bolt", torque_Nm: s.pitch_Nm },
    { what: "Thread friction", torque_Nm: s.threadFriction_Nm },
    { what: "Head friction", torque_Nm: s.headFriction_Nm },
  ].map((p) => ({ ...p, percent: (p.torque_Nm / r.torque_Nm) * 100 }));
}

/** The result's warnings to list: the over-90 % one is left out when the red alert already says it. */
export const shownWarnings = (r: PreloadResult): string[] => r.warnings.filter((w) => !(overYieldLimit(r) && /above 90 %/.test(w)));

/** The nut-factor condition's name to store with saved readings ("" for a custom K). */
export const lubeOf = (values: FormValues): string =>
  NUT_FACTOR_PRESETS.find((p) => p.condition === values.nutCondition && p.condition !== "custom")?.label ?? "";

/** Everything the result view needs besides the result: units, the yield figures, the model in words. */
export function preloadView(outcome: PreloadOutcome, values: FormValues) {
  const units = {
    fu: unitOr(values["out.force"], "kN"),
    tu: unitOr(values["out.torque"], "N.m"),
    su: unitOr(values["out.stress"], "MPa"),
    lu: unitOr(values["out.length"], "mm"),
  };
  const r = outcome.result;
  const toTorque = values.direction === "preload-to-torque";
  const model =
    values["method.kind"] === "friction"
      ? "friction model"
      : `K = ${(outcome.input as { method?: { k?: number } } | undefined)?.method?.k}`;
  const yieldForce_N = r && yieldForceOf(r);
  return {
    ...units,
    toTorque,
    modelLabel: `Model, ${model}`,
    over: r ? overYieldLimit(r) : false,
    yieldForce_N,
    limits: r && yieldForce_N !== undefined ? yieldLimits(r, yieldForce_N) : undefined,
  };
}

/** Keeps related fields in step as one types (see the module's comment). */
export function derivePreload(next: FormValues, name: string, value: string): void {
  if (name === "nutCondition") {
    const p = NUT_FACTOR_PRESETS.find((x) => x.condition === value);
    if (p?.k !== undefined) next["method.k"] = String(p.k);
  }
  if (name === "method.k") next.nutCondition = "custom";
  // Results show first in the system of what was typed.
  if (name === "torque.unit") followInputSystem(next, value, { "out.force": "force", "out.stress": "stress" });
  if (name === "preload.unit") followInputSystem(next, value, { "out.torque": "torque", "out.stress": "stress" });
}
