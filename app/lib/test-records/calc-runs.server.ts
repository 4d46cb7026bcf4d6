/**
 * A calculator run on a filed record's readings, kept with the record: Bore distortion on one
 * cylinder's diameters of a bore spec (each at the depth and angle of its position fields), or
 * piston-to-wall from a bore and a piston reading. A refusal is a DomainError on the form's
 * `calc` field, with the field of each reading that lacks its place.
 */
import { DomainError, type DomainIssue } from "~/lib/domain-error";
import { ANGLE_WORDS, DEPTH_WORDS, typedPlaces, type CalcForm } from "./calc-form";
import { boreGroups, distortionPlaces, isBoreSpec, MIN_DISTORTION_READINGS, runDistortion, runPistonToWall } from "./calcs";
import { limitsOf } from "./limits";
import { saveCalcRun, type TestRecordView } from "./records.server";

type Actor = { id: string; name?: string };

const refuse = (message: string, issues: DomainIssue[] = []) => new DomainError(message, { status: 400, field: "calc", issues });
const issuesOf = (errors: Record<string, string>): DomainIssue[] => Object.entries(errors).map(([path, message]) => ({ path, message }));

/** Runs the calculator the form asks for on the record in force and keeps it; returns the words to confirm it. */
export async function runRecordCalc(actor: Actor, view: TestRecordView, form: CalcForm): Promise<string> {
  const specs = view.specs.map(limitsOf);
  const current = view.readings;
  if (form.intent === "distortion") {
    const spec = specs.find((s) => s.id === form.specId && isBoreSpec(s));
    if (!spec) throw refuse("Choose a bore spec with readings.");
    const group = form.cylinder === undefined ? null : boreGroups([spec], current).find((g) => g.cylinder === form.cylinder);
    const rs = form.cylinder === undefined ? current.filter((r) => r.specId === spec.id) : (group?.readings ?? []);
    if (rs.length < MIN_DISTORTION_READINGS) throw refuse("Bore distortion needs at least three diameters.");
    const typed = typedPlaces(
      form,
      rs.map((r) => r.id),
    );
    const { places, missing } = distortionPlaces(rs, typed.places);
    const errors: Record<string, string> = { ...typed.errors };
    for (const m of missing) {
      if (m.depth) errors[`depth.${m.id}`] ??= DEPTH_WORDS;
      if (m.angle) errors[`angle.${m.id}`] ??= ANGLE_WORDS;
    }
    if (Object.keys(errors).length) throw refuse("Give every reading its depth and angle.", issuesOf(errors));
    const nominal = view.specs.find((s) => s.id === spec.id)?.nominal;
    const out = runDistortion(rs, places, nominal != null ? { value: nominal, unit: spec.unit } : null);
    if (!out.ok) throw refuse(out.errors.calc, issuesOf(out.errors));
    const label = group?.label ?? null;
    await saveCalcRun(actor, view.record.id, {
      version: view.record.currentVersion,
      kind: "distortion",
      label: `Bore distortion: ${spec.label}${label ? ` (${label})` : ""}`,
      input: out.input,
      result: out.result,
    });
    return "Bore distortion computed and kept with the record.";
  }
  const bore = current.find((r) => r.id === form.boreReading);
  const piston = current.find((r) => r.id === form.pistonReading);
  const errors: Record<string, string> = {};
  if (!bore) errors.boreReading = "Choose the bore reading.";
  if (!piston) errors.pistonReading = "Choose the piston reading.";
  if (bore && piston && bore.id === piston.id) errors.pistonReading = "Choose two different readings.";
  if (Object.keys(errors).length) throw refuse("Choose a bore and a piston reading.", issuesOf(errors));
  const spec = form.clearanceSpec ? (specs.find((s) => s.id === form.clearanceSpec) ?? null) : null;
  const out = runPistonToWall(bore!, piston!, spec);
  if (!out.ok) throw refuse(out.errors.calc, issuesOf(out.errors));
  await saveCalcRun(actor, view.record.id, {
    version: view.record.currentVersion,
    kind: "piston-to-wall",
    label: `Piston-to-wall${spec ? ` against ${spec.label}` : ""}`,
    input: out.input,
    result: out.result,
  });
  return "Piston-to-wall computed and kept with the record.";
}
