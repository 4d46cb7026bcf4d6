import { depthEntered } from "~/lib/recordings/positions";
import { RECORD_VERDICT_LABELS, READING_VERDICT_LABELS } from "~/lib/test-records/labels";
import type { BuildPage } from "./page.server";
import { boreOf, sizeText, strokeOf } from "./sizes";

// A build's readings for the shop's own spreadsheets (CSV) and tools (GET /api/builds/:number,
// docs/api-builds.md). Both come from what the build page shows.

export const BUILD_CSV_COLUMNS = [
  "work_order",
  "engine_serial",
  "record_id",
  "title",
  "procedure",
  "revision",
  "tested_on",
  "record_verdict",
  "spec",
  "spec_unit",
  "spec_min",
  "spec_max",
  "cylinder",
  "fastener",
  "journal",
  "depth",
  "depth_unit",
  "angle_deg",
  "reading",
  "reading_unit",
  "reading_in_spec_unit",
  "reading_verdict",
  "note",
  "filed_by",
] as const;

type Cell = string | number | null;

/**
 * One row per reading in force, one per spec not measured, and one per place a run left empty
 * (its place in the place columns; reading empty, verdict "Not measured", note "left empty on the run").
 */
export function buildCsvRows(page: BuildPage): Cell[][] {
  const rows: Cell[][] = [];
  for (const v of page.records) {
    const base: Cell[] = [
      page.build.number,
      page.build.engineSerial,
      v.record.id,
      v.record.title,
      v.procedure.title,
      v.revision.number,
      v.record.testedOn,
      RECORD_VERDICT_LABELS[v.record.verdict],
    ];
    for (const s of v.specs) {
      const spec: Cell[] = [s.label, s.unit, s.min, s.max];
      const rs = v.readings.filter((r) => r.specId === s.id).sort((a, b) => a.position - b.position);
      if (!rs.length) rows.push([...base, ...spec, null, null, null, null, null, null, null, null, null, "Not measured", "", v.filedBy]);
      for (const r of rs) {
        const depth = depthEntered({ depthM: r.depthM, depthUnit: r.depthUnit });
        rows.push([
          ...base,
          ...spec,
          r.cylinder,
          r.fastener,
          r.journal,
          depth?.value ?? null,
          depth?.unit ?? null,
          r.angleDeg,
          r.valueEntered,
          r.unitEntered,
          r.valueInSpecUnit,
          READING_VERDICT_LABELS[r.verdict],
          r.noteText,
          v.filedBy,
        ]);
      }
      for (const p of v.evaluation.missingPlaces.filter((x) => x.specId === s.id)) {
        const at = { cylinder: null, fastener: null, journal: null, [p.field]: p.n };
        const where = [at.cylinder, at.fastener, at.journal, null, null, null];
        rows.push([...base, ...spec, ...where, null, null, null, "Not measured", "left empty on the run", v.filedBy]);
      }
    }
  }
  return rows;
}

/** The JSON of GET /api/builds/:number (documented in docs/api-builds.md). */
export function buildJson(page: BuildPage) {
  const b = page.build;
  return {
    number: b.number,
    status: b.status,
    customer: { name: b.customerName, contact: b.customerContact },
    engine: {
      description: b.engine,
      serial: b.engineSerial,
      bore: b.boreM == null ? null : { m: b.boreM, unit: b.boreUnit, decimals: b.boreDecimals, text: sizeText(boreOf(b)) },
      stroke: b.strokeM == null ? null : { m: b.strokeM, unit: b.strokeUnit, decimals: b.strokeDecimals, text: sizeText(strokeOf(b)) },
      notes: b.notes,
    },
    leadBuilder: b.leadBuilderName,
    receivedOn: b.receivedOn,
    promisedOn: b.promisedOn,
    finishedAt: b.finishedAt,
    deliveredAt: b.deliveredAt,
    reopenReason: b.reopenReason,
    outOfSpec: page.outOfSpec.length,
    incomplete: page.incomplete.length,
    testRecords: page.records.map((v) => ({
      id: v.record.id,
      title: v.record.title,
      procedure: { title: v.procedure.title, slug: v.procedure.slug },
      revision: v.revision.number,
      testedOn: v.record.testedOn,
      filedBy: v.filedBy,
      filedAt: v.record.createdAt,
      verdict: v.evaluation.verdict,
      notMeasured: v.specs.filter((s) => v.evaluation.notMeasured.includes(s.id)).map((s) => s.label),
      placesNotMeasured: v.evaluation.missingPlaces.map((p) => ({
        spec: p.specLabel,
        place: p.label,
        position: { cylinder: null, fastener: null, journal: null, [p.field]: p.n },
      })),
      readings: v.readings.map((r) => {
        const s = v.specs.find((x) => x.id === r.specId);
        return {
          spec: s?.label ?? null,
          specLimits: s ? { min: s.min, max: s.max, unit: s.unit } : null,
          value: r.valueEntered,
          unit: r.unitEntered,
          decimals: r.valueDecimals,
          valueSi: r.valueSi,
          valueInSpecUnit: r.valueInSpecUnit,
          verdict: r.verdict,
          position: { cylinder: r.cylinder, fastener: r.fastener, journal: r.journal, depthM: r.depthM, angleDeg: r.angleDeg },
          note: r.noteText,
        };
      }),
    })),
    recordings: page.recordings.map((r) => ({ id: r.id, title: r.title, state: r.state, durationS: r.durationS })),
    marks: page.marks.map((m) => ({ id: m.id, recordingId: m.recordingId, t: m.tStart, text: m.text })),
  };
}
