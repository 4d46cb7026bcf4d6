import type { SpecLimits } from "./verdict";

/** A stored spec row (procedure_specs) as the limits the verdict function checks. */
export function limitsOf(s: {
  id: string;
  label: string;
  quantity: string;
  unit: string;
  min: number | null;
  max: number | null;
  nominal: number | null;
}): SpecLimits {
  return { id: s.id, label: s.label, quantity: s.quantity, unit: s.unit, min: s.min, max: s.max, nominal: s.nominal };
}
