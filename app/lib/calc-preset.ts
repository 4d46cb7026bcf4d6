/**
 * "Copy as calculator block": the JSON a calculator page copies and a procedure's calculator
 * block accepts. One shape for both sides: `{ calculator, input }`, where `input` is exactly
 * the input JSON of that calculator's function in app/lib/calc.
 */
import { z } from "zod";
import { clearanceInputSchema, distortionInputSchema, preloadInputSchema } from "~/lib/calc";
import type { CalcKind } from "~/lib/calc-kinds";

/**
 * Validates a preset (the input against its calculator's own schema). Parsing fills the
 * schemas' defaults; the parsed value is again a valid preset.
 */
export const calculatorPresetSchema = z.discriminatedUnion(
  "calculator",
  [
    z.object({ calculator: z.literal("preload"), input: preloadInputSchema }),
    z.object({ calculator: z.literal("distortion"), input: distortionInputSchema }),
    z.object({ calculator: z.literal("clearance"), input: clearanceInputSchema }),
  ],
  { error: 'calculator must be "preload", "distortion" or "clearance"' },
);

/** The preset for a calculator's input, as the text put on the clipboard. */
export function presetText(calculator: CalcKind, input: unknown): string {
  return JSON.stringify({ calculator, input }, null, 2);
}

/**
 * What the procedure editor's "Paste inputs" box makes of a pasted value: the whole copied
 * preset `{ calculator, input }` gives its calculator and input (checked against that
 * calculator's schema); anything else is taken as the block's input itself, for the block's
 * own check to judge.
 */
export function readPastedPreset(value: unknown): { ok: true; calculator?: CalcKind; input: unknown } | { ok: false; message: string } {
  if (value === null || typeof value !== "object" || !("calculator" in value)) return { ok: true, input: value };
  const parsed = calculatorPresetSchema.safeParse(value);
  if (parsed.success) return { ok: true, calculator: parsed.data.calculator, input: parsed.data.input };
  const first = parsed.error.issues[0];
  return {
    ok: false,
    message: `The copied inputs do not fit their calculator: ${[first?.path.join("."), first?.message].filter(Boolean).join(" ")}`,
  };
}
