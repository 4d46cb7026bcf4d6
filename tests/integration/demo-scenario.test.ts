// The demo shop tells one story: the head-stud procedure assumes the nut factor that its own
// bench recording's torque / clamp-load readings fit. Both come from the seed (scripts/seed/);
// the fit is computed again here as the watch page computes it, so the demo cannot drift.
import { and, eq, inArray } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { pairTorqueClamp } from "~/components/recordings/ReadingsChart";
import type { ReadingRow } from "~/components/recordings/types";
import {
  captionCues,
  captionEdits,
  captionSources,
  marks,
  procedureRevisions,
  procedures,
  readings,
  recordings,
  testRecords,
} from "~/db/schema";
import { waitFor } from "../support/app";
import { fitNutFactor } from "~/lib/calc";
import { db } from "~/lib/db.server";
import { getBuildByNumber } from "~/lib/builds/builds.server";
import { listRunsForBuild } from "~/lib/runs/runs.server";
import { walk, type JSONNode } from "~/lib/procedures/document";

const DEMO_RECORDING = "5eed0000-0000-4000-8000-00000000c1a9";
const STUDS_SLUG = "head-stud-installation-and-torque-sequence";

describe("demo scenario", () => {
  it("the head-stud procedure's nut factor is the one its bench recording's readings fit, within their scatter", async () => {
    const rows = await db().select().from(readings).where(eq(readings.recordingId, DEMO_RECORDING));
    const pairs = pairTorqueClamp(rows.map((r) => ({ ...r, createdBy: r.createdBy, authorName: null }) as unknown as ReadingRow));
    expect(pairs.length).toBeGreaterThanOrEqual(3);
    // ISO 16047 / VDI 2230 short form T = K·F·d, fitted through the origin (docs/calculations.md).
    const fit = fitNutFactor(
      pairs.map((p) => ({ torque: { value: p.torque.valueSi, unit: "N.m" }, preload: { value: p.clamp.valueSi, unit: "N" } })),
      "M12x1.5",
    );

    const [proc] = await db()
      .select({ doc: procedureRevisions.doc })
      .from(procedures)
      .innerJoin(procedureRevisions, and(eq(procedureRevisions.id, procedures.publishedRevisionId)))
      .where(eq(procedures.slug, STUDS_SLUG));
    expect(proc).toBeDefined();
    const presetKs: number[] = [];
    const texts: string[] = [];
    walk(proc.doc as JSONNode, (n) => {
      const preset = n.type === "calculator" ? (n.attrs?.preset as { thread?: string; method?: { kind?: string; k?: number } }) : null;
      if (preset?.thread === "M12x1.5" && preset.method?.kind === "nut-factor" && typeof preset.method.k === "number")
        presetKs.push(preset.method.k);
      if (n.type === "text" && typeof n.text === "string") texts.push(n.text);
    });
    expect(presetKs).toHaveLength(1);
    const k = presetKs[0];
    expect(Math.abs(k - fit.k)).toBeLessThanOrEqual(fit.kStdDev);
    // The words a builder reads say the same K as the calculator block.
    const said = texts.join("").match(/assumes K = (\d+\.\d+)/);
    expect(said && Number(said[1])).toBe(k);
  });
});

describe("demo scenario: what is said in the recordings (issue 17)", () => {
  const BORE_CLIP = "5eed0000-0000-4000-8000-0000000b04e1";
  const lines = (recordingId: string) =>
    db().select().from(captionCues).where(eq(captionCues.recordingId, recordingId)).orderBy(captionCues.position);

  it("the stud test's captions came from a file, with the misheard “molly” corrected and kept in its history", async () => {
    const cues = await lines(DEMO_RECORDING);
    expect(cues.length).toBeGreaterThanOrEqual(5);
    const corrected = cues.find((c) => c.version > 1);
    expect(corrected?.text).toContain("moly on the threads");
    const [edit] = await db().select().from(captionEdits).where(eq(captionEdits.cueId, corrected!.id));
    expect(edit).toMatchObject({ textBefore: expect.stringContaining("molly"), editedBy: "demo-tomas" });
  });

  it("the bore clip's captions are read out of its own subtitle track by the worker", { timeout: 60_000 }, async () => {
    const cues = await waitFor(async () => {
      const got = await lines(BORE_CLIP);
      return got.length > 0 && got;
    }, 55_000);
    expect(cues[0]).toMatchObject({ startS: 0.8, endS: 4, text: "Zeroing the bore gauge in the mic first, at the nominal size." });
    const [source] = await db().select().from(captionSources).where(eq(captionSources.recordingId, BORE_CLIP));
    expect(source.kind).toBe("embedded");
  });

  it("three demo builds: one delivered, one on the bench, one out of spec; each engine the block its procedures are for", async () => {
    const [delivered, bench, outOfSpec] = await Promise.all(["LEW-24-0117", "LEW-24-0118", "LEW-24-0119"].map((n) => getBuildByNumber(n)));
    expect(delivered?.status).toBe("delivered");
    expect(bench?.status).toBe("on_bench");
    expect(await getBuildByNumber("LEW-24-0121")).toBeNull();
    const out = await db().select().from(testRecords).where(eq(testRecords.buildId, outOfSpec!.id));
    expect(out.some((r) => r.verdict === "out")).toBe(true);
    // LEW-24-0117 was honed by the iron-lined aluminium block procedure: its engine says so.
    const honed = await db()
      .select({ slug: procedures.slug })
      .from(testRecords)
      .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
      .where(eq(testRecords.buildId, delivered!.id));
    expect(honed.map((h) => h.slug)).toContain("torque-plate-honing-iron-lined-block");
    expect(delivered!.engine).toMatch(/aluminium block with iron liners/);
  });

  it("the demo recordings are on builds by build_id, their marks on their recording's build, titles without a work order", async () => {
    const BORE_CLIP = "5eed0000-0000-4000-8000-0000000b04e1";
    const bench = await getBuildByNumber("LEW-24-0118");
    const honed = await getBuildByNumber("LEW-24-0117");
    const recs = await db()
      .select()
      .from(recordings)
      .where(inArray(recordings.id, [DEMO_RECORDING, BORE_CLIP]));
    expect(Object.fromEntries(recs.map((r) => [r.id, r.buildId]))).toEqual({ [DEMO_RECORDING]: bench!.id, [BORE_CLIP]: honed!.id });
    for (const r of recs) expect(r.title).not.toMatch(/WO|LEW-/);
    const demoMarks = await db().select().from(marks).where(eq(marks.recordingId, DEMO_RECORDING));
    expect(demoMarks.length).toBeGreaterThanOrEqual(2);
    for (const m of demoMarks) expect(m.buildId).toBe(bench!.id);
  });

  it("the build on the bench has the demo's open run, partway through the head studs procedure", async () => {
    const build = await getBuildByNumber("LEW-24-0118");
    expect(build?.status).toBe("on_bench");
    const run = (await listRunsForBuild(build!.id)).find((r) => r.id === "5eed0000-0000-4000-8000-00000000a001");
    expect(run).toMatchObject({ status: "open", procedureSlug: STUDS_SLUG, startedByName: "Marcus Lind" });
    expect(run!.measured).toBeGreaterThan(0);
    expect(run!.measured).toBeLessThan(run!.total);
  });
});
