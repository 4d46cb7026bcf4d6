/**
 * Where a reading was taken: the position fields that fit each quantity (a stud for a torque,
 * a cylinder, a depth below the deck and an angle for a bore, a journal for a bearing), their
 * zod schema, the words they read as ("cyl 3, 20 mm down, 90°"), and the parser that takes
 * those words out of an old free-text label. Pure: no Node built-ins, safe in the browser.
 * The same parser runs in SQL in migration 0021 (reading_position_from_label); an integration
 * test holds the two to the same answers.
 */
import { z } from "zod";
import { fromSI, toSI } from "~/lib/calc";
import { POSITION_RANGES } from "~/lib/edge";
import { typedText } from "~/lib/typed-number";

export type PositionField = "fastener" | "cylinder" | "depth" | "angle" | "journal";

/** Which position fields each quantity of `quantities.ts` takes (none: the label says it all). */
export const POSITION_FIELDS: Record<string, PositionField[]> = {
  torque: ["fastener"],
  "clamp-load": ["fastener"],
  "bore-diameter": ["cylinder", "depth", "angle"],
  "out-of-round": ["cylinder", "depth"],
  clearance: ["journal"],
  "ring-gap": ["cylinder"],
  "leak-down": ["cylinder"],
  temperature: [],
  length: [],
  other: [],
};

export function positionFieldsFor(quantity: string): PositionField[] {
  return POSITION_FIELDS[quantity] ?? [];
}

/**
 * The position fields of a procedure spec's readings on a test record. A spec names only its
 * unit kind (length, torque…), so its label tells a bore from a bearing or a deck. Kept in
 * step with spec_position_fields() of migration 0022.
 */
export function positionFieldsForSpec(spec: { quantity: string; label: string }): PositionField[] {
  const l = spec.label;
  switch (spec.quantity) {
    case "torque":
    case "force":
      return ["fastener"];
    case "stress":
      return ["cylinder"]; // a leak-down or compression figure per cylinder
    case "length":
      if (/\b(bearing|journal|main|rod|crank)/i.test(l)) return ["journal"];
      if (/\b(stud|bolt|protrusion)/i.test(l)) return ["fastener"];
      if (/round/i.test(l)) return ["cylinder", "depth"];
      if (/\b(piston|skirt|ring|gap)/i.test(l)) return ["cylinder"];
      if (/\b(bore|cylinder|barrel|liner)/i.test(l)) return ["cylinder", "depth", "angle"];
      return [];
    default:
      return [];
  }
}

/** How each position field is named on a form, with an example for its placeholder. */
export const POSITION_FIELD_WORDS: Record<PositionField, { label: string; placeholder: string }> = {
  fastener: { label: "Stud no.", placeholder: "4" },
  cylinder: { label: "Cylinder", placeholder: "3" },
  journal: { label: "Journal", placeholder: "2" },
  depth: { label: "Depth below deck", placeholder: "20" },
  angle: { label: "Angle (°)", placeholder: "90" },
};

/** Units a depth below the deck is typed in. */
export const DEPTH_UNITS = ["mm", "in"] as const;
export type DepthUnit = (typeof DEPTH_UNITS)[number];

/** A reading's position as stored (depth in metres, with the unit it was typed in). */
export type Position = {
  fastener: number | null;
  cylinder: number | null;
  journal: number | null;
  depthM: number | null;
  depthUnit: string | null;
  angleDeg: number | null;
};

export const NO_POSITION: Position = { fastener: null, cylinder: null, journal: null, depthM: null, depthUnit: null, angleDeg: null };

/** What a label field should suggest for a quantity: the words a position field does not hold. */
export function labelPlaceholder(quantity: string): string {
  switch (quantity) {
    case "torque":
    case "clamp-load":
      return "final pass, re-check";
    case "bore-diameter":
    case "out-of-round":
      return "plate on, hot";
    case "clearance":
      return "main, Plastigage";
    case "ring-gap":
      return "top ring";
    case "leak-down":
      return "after break-in";
    case "temperature":
      return "oil sump";
    case "length":
      return "deck height, front";
    default:
      return "what was read";
  }
}

const whole = (field: "fastener" | "cylinder" | "journal", message: string) =>
  z
    .number({ error: message })
    .int(message)
    .min(POSITION_RANGES[field].min, message)
    .max(POSITION_RANGES[field].max, message)
    .nullable()
    .optional();

/** The position part of a reading's JSON (API and pages). A field the quantity does not take is an error. */
export const positionInputSchema = z.object({
  fastener: whole("fastener", `A stud or bolt number from ${POSITION_RANGES.fastener.min} to ${POSITION_RANGES.fastener.max}.`),
  cylinder: whole("cylinder", `A cylinder number from ${POSITION_RANGES.cylinder.min} to ${POSITION_RANGES.cylinder.max}.`),
  journal: whole("journal", `A journal number from ${POSITION_RANGES.journal.min} to ${POSITION_RANGES.journal.max}.`),
  depth: z
    .object({
      value: z.number({ error: "Enter the depth as a number." }).finite("Enter the depth as a number."),
      unit: z.enum(DEPTH_UNITS, { error: "A depth is in mm or in." }),
    })
    .nullable()
    .optional(),
  angle: z
    .number({ error: "Enter the angle in degrees." })
    .finite("Enter the angle in degrees.")
    .min(POSITION_RANGES.angleDeg.min, "An angle runs from 0 to 360°.")
    .max(POSITION_RANGES.angleDeg.max, "An angle runs from 0 to 360°.")
    .nullable()
    .optional(),
});
export type PositionInput = z.infer<typeof positionInputSchema>;

const FIELD_WORDS: Record<PositionField, string> = {
  fastener: "stud number",
  cylinder: "cylinder",
  depth: "depth",
  angle: "angle",
  journal: "journal",
};

/** Issues for a position that does not fit the quantity, or a depth outside the bore (zod ctx). */
export function positionIssues(
  quantity: string | PositionField[],
  p: PositionInput,
  quantityLabel: string,
): { path: string; message: string }[] {
  const fits = typeof quantity === "string" ? positionFieldsFor(quantity) : quantity;
  const out: { path: string; message: string }[] = [];
  for (const f of ["fastener", "cylinder", "journal", "depth", "angle"] as PositionField[]) {
    if (p[f] != null && !fits.includes(f))
      out.push({
        path: f,
        message: `A ${quantityLabel.toLowerCase()} reading has no ${FIELD_WORDS[f]}${fits.length ? `; it takes ${fits.map((x) => FIELD_WORDS[x]).join(", ")}` : ""}.`,
      });
  }
  if (p.depth) {
    const m = toSI(p.depth.value, p.depth.unit);
    if (m < POSITION_RANGES.depthM.min || m > POSITION_RANGES.depthM.max)
      out.push({
        path: "depth",
        message:
          p.depth.value < 0
            ? "A depth below the deck cannot be negative."
            : "That is deeper than any bore (1 m); check the number and the unit.",
      });
  }
  return out;
}

/** The stored columns of a parsed position input. */
export function storedPosition(p: PositionInput): Position {
  return {
    fastener: p.fastener ?? null,
    cylinder: p.cylinder ?? null,
    journal: p.journal ?? null,
    depthM: p.depth ? toSI(p.depth.value, p.depth.unit) : null,
    depthUnit: p.depth ? p.depth.unit : null,
    angleDeg: p.angle ?? null,
  };
}

/** A stored depth as typed: 0.02 m typed in mm → 20. */
export function depthEntered(p: Pick<Position, "depthM" | "depthUnit">): { value: number; unit: DepthUnit } | null {
  if (p.depthM == null) return null;
  const unit: DepthUnit = p.depthUnit === "in" ? "in" : "mm";
  return { value: Number(fromSI(p.depthM, unit).toPrecision(6)), unit };
}

/** The input form of a stored position (what a PATCH of the same reading would send). */
export function positionInputOf(p: Partial<Position>): PositionInput {
  const depth = depthEntered({ depthM: p.depthM ?? null, depthUnit: p.depthUnit ?? null });
  return { fastener: p.fastener ?? null, cylinder: p.cylinder ?? null, journal: p.journal ?? null, depth, angle: p.angleDeg ?? null };
}

/** "cyl 3 · 20 mm down · 90°", "stud 4", "journal 2"; "" without a position. */
export function positionText(p: Partial<Position>, sep = " · "): string {
  const parts: string[] = [];
  if (p.fastener != null) parts.push(`stud ${p.fastener}`);
  if (p.cylinder != null) parts.push(`cyl ${p.cylinder}`);
  if (p.journal != null) parts.push(`journal ${p.journal}`);
  const d = depthEntered({ depthM: p.depthM ?? null, depthUnit: p.depthUnit ?? null });
  if (d) parts.push(`${d.value} ${d.unit} down`);
  if (p.angleDeg != null) parts.push(`${Number(p.angleDeg.toPrecision(6))}°`);
  return parts.join(sep);
}

// ---- old labels ------------------------------------------------------------------------------

// Each comma-separated part of a label is one of these, or it stays in the label. Kept in step
// with the SQL of migration 0021 (tests/integration/reading-positions.test.ts compares them).
const LABEL_PATTERNS = {
  fastener: /^(?:stud|bolt|fastener|nut)\s*(?:no\.?|#)?\s*(\d{1,3})$/i,
  cylinder: /^(?:cyl(?:inder)?|bore)\s*(?:no\.?|#)?\s*(\d{1,2})$/i,
  journal: /^(?:journal|jnl|main|rod)\s*(?:no\.?|#)?\s*(\d{1,2})$/i,
  depth: /^(\d+(?:\.\d+)?)\s*(mm|in|")\s*(?:down|deep|below(?: the)? deck)$/i,
  angle: /^(\d+(?:\.\d+)?)\s*(?:°|deg|degrees)$/i,
};

/**
 * Takes the position out of an old free-text label, for the quantity's fields only:
 * "cyl 3, 20 mm down, 90°" on a bore reading → cylinder 3, depth 20 mm, angle 90, label "".
 * Parts that are not a position (or are one the quantity does not take, or out of range) stay
 * in the label, in their order.
 */
export function positionFromLabel(quantity: string | PositionField[], label: string): { position: Position; label: string } {
  const fits = typeof quantity === "string" ? positionFieldsFor(quantity) : quantity;
  const position: Position = { ...NO_POSITION };
  const kept: string[] = [];
  for (const raw of label.split(/[,;]/)) {
    const part = raw.trim();
    if (!part) continue;
    let taken = false;
    for (const f of fits) {
      const m = LABEL_PATTERNS[f].exec(part);
      if (!m) continue;
      if (f === "depth") {
        if (position.depthM != null) break;
        const unit: DepthUnit = m[2].toLowerCase() === "mm" ? "mm" : "in";
        const depthM = toSI(Number(m[1]), unit);
        if (depthM > POSITION_RANGES.depthM.max) break;
        position.depthM = depthM;
        position.depthUnit = unit;
      } else if (f === "angle") {
        const a = Number(m[1]);
        if (position.angleDeg != null || a > POSITION_RANGES.angleDeg.max) break;
        position.angleDeg = a;
      } else {
        const n = Number(m[1]);
        if (position[f] != null || n < POSITION_RANGES[f].min || n > POSITION_RANGES[f].max) break;
        position[f] = n;
      }
      taken = true;
      break;
    }
    if (!taken) kept.push(part);
  }
  return { position, label: kept.join(", ") };
}

// ---- Bore distortion ---------------------------------------------------------------------------

export type BoreReadingLike = Partial<Position> & {
  quantity: string;
  valueEntered: number;
  unitEntered: string;
  valueSi: number;
  valueDecimals?: number | null;
};

/** The cylinders of a recording's bore-diameter readings that have a depth and an angle. */
export function boreCylinders(readings: BoreReadingLike[]): number[] {
  const set = new Set<number>();
  for (const r of readings)
    if (r.quantity === "bore-diameter" && r.cylinder != null && r.depthM != null && r.angleDeg != null) set.add(r.cylinder);
  return [...set].sort((a, b) => a - b);
}

/**
 * One cylinder's bore readings as the Bore distortion form's fields: depths down, angles
 * across, each diameter in its cell (in the unit most of them were typed in; a later reading
 * at the same place replaces an earlier one). Null when the cylinder has no placed readings.
 */
export function distortionFieldsFor(readings: BoreReadingLike[], cylinder: number): Record<string, string> | null {
  const mine = readings.filter((r) => r.quantity === "bore-diameter" && r.cylinder === cylinder && r.depthM != null && r.angleDeg != null);
  if (!mine.length) return null;
  const most = (xs: string[]) =>
    [...xs.reduce((m, x) => m.set(x, (m.get(x) ?? 0) + 1), new Map<string, number>())].sort((a, b) => b[1] - a[1])[0][0];
  const depthUnit = most(mine.map((r) => (r.depthUnit === "in" ? "in" : "mm"))) as DepthUnit;
  const unit = most(mine.map((r) => r.unitEntered));
  const depths = [...new Set(mine.map((r) => r.depthM!))].sort((a, b) => a - b);
  const angles = [...new Set(mine.map((r) => r.angleDeg!))].sort((a, b) => a - b);
  const fmt = (x: number) => String(Number(x.toPrecision(6)));
  const v: Record<string, string> = {
    depths: depths.map((d) => fmt(fromSI(d, depthUnit))).join(", "),
    "depth.unit": depthUnit,
    angles: angles.map(fmt).join(", "),
    "reading.unit": unit,
  };
  for (const r of mine) {
    const i = depths.indexOf(r.depthM!);
    const j = angles.indexOf(r.angleDeg!);
    // A diameter typed in the form's unit keeps the digits typed (88.010 stays 88.010).
    v[`m.${i}.${j}`] = r.unitEntered === unit ? typedText(r.valueEntered, r.valueDecimals) : fmt(fromSI(r.valueSi, unit as never));
  }
  return v;
}
