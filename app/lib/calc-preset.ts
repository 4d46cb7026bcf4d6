/**
 * "Copy as calculator block": the JSON a calculator page copies and a procedure's calculator
 * block accepts. One shape for both sides: `{ calculator, input }`, where `input` is exactly
 * the input JSON of that calculator's function in app/lib/calc.
 */
import { z } from "zod";
import {
  clearanceInputSchema,
  distortionInputSchema,
  preloadInputSchema,
  type ClearanceInput,
  type DistortionInput,
  type PreloadInput,
} from "~/lib/calc";
import type { CalcKind } from "~/lib/calc-kinds";

/** The preset: which calculator, and that calculator's input. */
export type CalculatorPreset =
  | { calculator: "preload"; input: PreloadInput }
  | { calculator: "distortion"; input: DistortionInput }
  | { calculator: "clearance"; input: ClearanceInput };

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
