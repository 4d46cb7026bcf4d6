/**
 * Preload: torque ↔ clamp load with the nut-factor model (T = K·F·d) or the friction model
 * of ISO 16047 / VDI 2230 (T = F·(P/(2π) + μth·d2/(2·cos 30°) + μhead·Db/2)).
 */
import { failWith } from "./errors";
import { STEEL_MODULUS_GPA, strengthFor } from "./materials";
import { preloadInputSchema, type PreloadInput } from "./schemas";
import { parseThread, type ThreadGeometry } from "./threads";
import { toSI } from "./units";

/** The friction model's torque split into its three terms (they add up to torque_Nm). */
export interface TorqueSplit {
  /** F·P/(2π): the part that stretches the bolt. */
  pitch_Nm: number;
  /** F·μth·d2/(2·cos 30°): thread friction. */
  threadFriction_Nm: number;
  /** F·μhead·Db/2: friction under the head or nut. */
  headFriction_Nm: number;
}

/** Result of calculatePreload (SI keys end with their unit). */
export interface PreloadResult {
  preload_N: number;
  torque_Nm: number;
  thread: ThreadGeometry;
  /** Preload over the tensile stress area. */
  stress_MPa: number;
  /** Stress as a percentage of the yield strength (80.7 means 80.7 %), when a material is given. */
  percentOfYield?: number;
  /** F·L/(As·E) over the grip, using the stress area for the whole length (a simplification). */
  elongation_mm?: number;
  /** Friction model only. */
  torqueSplit?: TorqueSplit;
  warnings: string[];
}

/** Torque per newton of preload (N·m/N, i.e. metres) for each friction term, d and Db in metres. */
export function frictionTerms(
  thread: ThreadGeometry,
  muThread: number,
  muHead: number,
  headDiameter_m: number,
): { pitch: number; thread: number; head: number } {
  return {
    pitch: thread.pitch_mm / 1000 / (2 * Math.PI),
    thread: (muThread * (thread.d2_mm / 1000)) / (2 * Math.cos(Math.PI / 6)),
    head: (muHead * headDiameter_m) / 2,
  };
}

const round1 = (x: number) => Math.round(x * 10) / 10;

/**
 * Preload from torque or torque from preload, stress over the stress area, percent of yield
 * (ISO 898-1 / SAE J429 or a given yield), elongation over a grip and, for the friction model,
 * the torque split. Throws the ZodError on invalid input.
 */
export function calculatePreload(input: PreloadInput): PreloadResult {
  const v = preloadInputSchema.parse(input);
  const parsed = parseThread(v.thread);
  if (!parsed) failWith(["thread"], "unknown thread designation");
  const thread = parsed.geometry;
  const d_m = thread.d_mm / 1000;
  const warnings: string[] = [];

  // Torque per newton of preload: K·d for the nut factor, the three terms for friction.
  let perN: number;
  let terms: { pitch: number; thread: number; head: number } | undefined;
  if (v.method.kind === "nut-factor") {
    perN = v.method.k * d_m;
    if (v.method.k < 0.05 || v.method.k > 0.5)
      warnings.push(`A nut factor of ${v.method.k} is unusual (most joints fall between 0.1 and 0.3); check the value.`);
  } else {
    const db_m = toSI(v.method.headDiameter.value, v.method.headDiameter.unit);
    terms = frictionTerms(thread, v.method.muThread, v.method.muHead, db_m);
    perN = terms.pitch + terms.thread + terms.head;
    if (db_m * 1000 <= thread.d_mm)
      warnings.push(
        `The head bearing diameter (${round1(db_m * 1000)} mm) is not larger than the thread (${round1(thread.d_mm)} mm); Db is the effective diameter of the bearing face, usually about 1.3–1.5·d.`,
      );
    if (db_m * 1000 > 4 * thread.d_mm)
      warnings.push(`The head bearing diameter is more than four times the thread diameter; check the value and its unit.`);
    if (v.method.muThread > 0.5 || v.method.muHead > 0.5)
      warnings.push("A friction coefficient above 0.5 is unusual for threaded fasteners; check the value.");
  }

  let preload_N: number;
  let torque_Nm: number;
  if (v.direction === "preload-to-torque") {
    const p = v.preload!;
    preload_N = toSI(p.value, p.unit);
    torque_Nm = preload_N * perN;
  } else {
    const t = v.torque!;
    torque_Nm = toSI(t.value, t.unit);
    preload_N = torque_Nm / perN;
  }

  const stress_MPa = preload_N / thread.stressArea_mm2;
  const result: PreloadResult = { preload_N, torque_Nm, thread, stress_MPa, warnings };
  if (stress_MPa > 2000)
    warnings.push(
      `The stress (${Math.round(stress_MPa)} MPa) is beyond the tensile strength of any bolt steel; check the inputs and their units.`,
    );

  if (v.material) {
    let yield_MPa: number;
    let label: string;
    if (v.material.yieldStrength) {
      yield_MPa = toSI(v.material.yieldStrength.value, v.material.yieldStrength.unit) / 1e6;
      label = "the given yield strength";
    } else {
      const id = v.material.propertyClass!;
      const s = strengthFor(id, thread.d_mm);
      yield_MPa = s.yield_MPa;
      label = `${s.label} (${s.sizeRange}: ${round1(yield_MPa)} MPa)`;
      if (!s.inRange)
        warnings.push(`${s.label} does not cover a ${round1(thread.d_mm)} mm thread; the nearest size range of the table is used.`);
      if (id.startsWith("SAE") && thread.system === "iso-metric")
        warnings.push("An SAE J429 grade is applied to a metric thread; metric bolts are graded to ISO 898-1.");
      if (!id.startsWith("SAE") && thread.system === "unified")
        warnings.push("An ISO 898-1 class is applied to a Unified inch thread; inch bolts are graded to SAE J429.");
    }
    const percent = (stress_MPa / yield_MPa) * 100;
    result.percentOfYield = percent;
    if (percent > 90)
      warnings.push(`The stress (${round1(stress_MPa)} MPa) is ${round1(percent)} % of the yield strength of ${label}: above 90 %.`);
    if (percent > 100) warnings.push(`The stress passes the yield strength (${round1(percent)} %): the bolt would yield at this preload.`);
  }

  if (v.grip) {
    const L_mm = toSI(v.grip.length.value, v.grip.length.unit) * 1000;
    const E_MPa = v.grip.modulus ? toSI(v.grip.modulus.value, v.grip.modulus.unit) / 1e6 : STEEL_MODULUS_GPA * 1000;
    result.elongation_mm = (preload_N * L_mm) / (thread.stressArea_mm2 * E_MPa);
  }

  if (terms) {
    result.torqueSplit = {
      pitch_Nm: preload_N * terms.pitch,
      threadFriction_Nm: preload_N * terms.thread,
      headFriction_Nm: preload_N * terms.head,
    };
  }
  return result;
}
