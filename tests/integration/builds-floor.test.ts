// Builds on the Shop floor and runs on a build's timeline (issue 16's acceptance review): the
// in-progress list is ordered out-of-spec first before it is cut to its length, each build shows
// its open runs, and a run's start, finish or stop is on the build's timeline with who and when.
import { randomUUID } from "node:crypto";
import { eq, inArray, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { builds } from "~/db/schema";
import { recordCounts } from "~/lib/builds/builds.server";
import { IN_PROGRESS } from "~/lib/builds/status";
import { db } from "~/lib/db.server";
import { listRunsForBuild } from "~/lib/runs/runs.server";
import { createUser, http, type TestUser } from "../support/app";
import { demoBoreSpec } from "../support/builds";

const STUDS = "head-stud-installation-and-torque-sequence";
const HONING = "torque-plate-honing-iron-lined-block";
const tag = () => randomUUID().slice(0, 6).toUpperCase();
const number = () => `SF-${String(10 + Math.floor(Math.random() * 89))}-${10_000 + Math.floor(Math.random() * 89_999)}`;

async function benchBuild(extra: Partial<typeof builds.$inferInsert> = {}) {
  const [b] = await db()
    .insert(builds)
    .values({ number: number(), customerName: `Floor test ${tag()}`, status: "on_bench", cylinders: 4, mainJournals: 5, ...extra })
    .returning();
  return b;
}

async function startRun(user: TestUser, slug: string, build: string): Promise<string> {
  const res = await http("/runs/start", { cookie: user.cookie, form: { procedure: slug, build } });
  expect(res.status).toBe(302);
  const id = /\/runs\/([0-9a-f-]{36})$/.exec(res.headers.get("location") ?? "")?.[1];
  expect(id).toBeTruthy();
  return id!;
}

const torqueAt = (fastener: number, value: number) => ({
  key: randomUUID(),
  specKey: "studs-final",
  position: { fastener },
  value,
  unit: "N.m",
  decimals: 0,
  typedAt: new Date().toISOString(),
  device: "floor test tablet",
});

/** The Shop floor's in-progress rows, in the order shown: number and records out of spec. */
function floorRows(html: string) {
  return [...html.matchAll(/data-testid="build-in-progress" data-number="([^"]+)" data-out="(\d+)"/g)].map((m) => ({
    number: m[1],
    out: Number(m[2]),
  }));
}

/** The `<li>` of one build on the Shop floor. */
function floorRow(html: string, n: string) {
  const at = html.indexOf(`data-number="${n}"`);
  expect(at).toBeGreaterThan(0);
  return html.slice(at, html.indexOf("</li>", at));
}

describe("builds on the Shop floor and runs on the timeline", () => {
  it("the Shop floor orders builds by records out of spec before cutting the list, so an old out-of-spec build stays on it", async () => {
    const qc = await createUser("qc");
    // Twelve builds changed just now with nothing out of spec would fill the list by date alone…
    await db()
      .insert(builds)
      .values(Array.from({ length: 13 }, () => ({ number: number(), customerName: "Busy week", status: "on_bench" as const })));
    // …and this one, out of spec, was last changed two years ago.
    const old = await benchBuild({ customerName: "Old loose main" });
    const { slug, revisionId, spec } = await demoBoreSpec();
    const b = `r.${spec.id}.0`;
    const filed = await http(`/test-records/new?procedure=${slug}`, {
      cookie: qc.cookie,
      form: {
        revisionId,
        title: "Bore check",
        workOrder: old.number,
        engineSerial: "",
        testedOn: new Date().toISOString().slice(0, 10),
        notes: "",
        [`${b}.value`]: "90.500",
        [`${b}.unit`]: "mm",
        [`${b}.cylinder`]: "1",
        [`${b}.depth`]: "10",
        [`${b}.depthUnit`]: "mm",
        [`${b}.angle`]: "0",
      },
    });
    expect(filed.status).toBe(302);
    await db().update(builds).set({ updatedAt: sql`now() - interval '2 years'` }).where(eq(builds.id, old.id));

    const html = await (await http("/", { cookie: qc.cookie })).text();
    const rows = floorRows(html);
    expect(rows).toHaveLength(12);
    // Out of spec first, in the order shown…
    for (let i = 1; i < rows.length; i++) expect(rows[i - 1].out).toBeGreaterThanOrEqual(rows[i].out);
    // …and no build left off has more records out of spec than one shown.
    const inShop = await db()
      .select({ id: builds.id, number: builds.number })
      .from(builds)
      .where(inArray(builds.status, [...IN_PROGRESS]));
    const counts = await recordCounts(inShop.map((x) => x.id));
    const shown = new Set(rows.map((r) => r.number));
    const leftOff = inShop.filter((x) => !shown.has(x.number)).map((x) => counts.get(x.id)?.out ?? 0);
    expect(Math.max(0, ...leftOff)).toBeLessThanOrEqual(Math.min(...rows.map((r) => r.out)));
    expect(counts.get(old.id)?.out).toBe(1);
    // With fewer than twelve builds out of spec in the shop, every one of them is on the list.
    const outInShop = inShop.filter((x) => (counts.get(x.id)?.out ?? 0) > 0).map((x) => x.number);
    if (outInShop.length < 12) {
      expect(rows.map((r) => r.number)).toEqual(expect.arrayContaining(outInShop));
      expect(floorRow(html, old.number)).toContain("1 record out of spec");
    }
  });

  it("each build in progress shows its open runs and how much of them is measured; a run's start, finish and stop are on the timeline", async () => {
    const builder = await createUser("builder", { name: `Rhea Floor ${tag()}` });
    const qc = await createUser("qc");
    const build = await benchBuild();

    // Finished: one stud measured, the record filed (Incomplete, which is the run's business).
    const finished = await startRun(builder, STUDS, build.number);
    expect(
      (await http(`/api/runs/${finished}/entries`, { method: "POST", cookie: builder.cookie, json: { entries: [torqueAt(1, 110)] } }))
        .status,
    ).toBe(200);
    expect(
      (
        await http(`/runs/${finished}`, {
          cookie: builder.cookie,
          form: { intent: "finish", "studs.studs-final": "1", "studs.studs-protrusion": "1", "studs.studs-stretch": "1" },
        })
      ).status,
    ).toBe(302);
    // Stopped with a reason.
    const stopped = await startRun(builder, HONING, build.number);
    expect(
      (await http(`/runs/${stopped}`, { cookie: builder.cookie, form: { intent: "abandon", reason: "Gauge out of calibration" } })).status,
    ).toBe(302);
    // Two open, one partway.
    const open = await startRun(builder, STUDS, build.number);
    expect(
      (
        await http(`/api/runs/${open}/entries`, {
          method: "POST",
          cookie: builder.cookie,
          json: { entries: [torqueAt(1, 110), torqueAt(2, 111)] },
        })
      ).status,
    ).toBe(200);
    await startRun(builder, HONING, build.number);

    const openRuns = (await listRunsForBuild(build.id)).filter((r) => r.status === "open");
    expect(openRuns).toHaveLength(2);
    const measured = openRuns.reduce((n, r) => n + r.measured, 0);
    const total = openRuns.reduce((n, r) => n + r.total, 0);
    expect(measured).toBeGreaterThan(0);
    expect(total).toBeGreaterThan(measured);

    const floor = await (await http("/", { cookie: qc.cookie })).text();
    const row = floorRow(floor, build.number);
    expect(row).toContain(`2 runs open · ${measured} of ${total} measured`);
    // The counts speak of records: the finished run filed one, Incomplete (one stud of ten measured).
    expect(row).toContain("1 record incomplete");

    const all = await listRunsForBuild(build.id);
    const which = (id: string) => {
      const r = all.find((x) => x.id === id)!;
      return `${r.procedureTitle} (revision ${r.revisionNumber})`;
    };
    const page = await (await http(`/builds/${build.number}`, { cookie: qc.cookie })).text();
    const from = page.indexOf('id="timeline"');
    const timeline = page.slice(from, page.indexOf("</section>", from));
    const line = (what: string) => {
      const at = timeline.indexOf(what);
      expect(at, what).toBeGreaterThan(0);
      return timeline.slice(Math.max(0, timeline.lastIndexOf("<li", at)), timeline.indexOf("</li>", at));
    };
    expect(line(`Started a run of ${which(finished)}`)).toContain(builder.name);
    expect(line(`Finished the run of ${which(finished)}, filing its test record`)).toContain(builder.name);
    expect(line(`Stopped the run of ${which(stopped)}: Gauge out of calibration`)).toContain(builder.name);
    expect(timeline.split(`Started a run of ${which(finished)}`).length - 1).toBe(2);
    expect(timeline.split(`Started a run of ${which(stopped)}`).length - 1).toBe(2);
  });
});
