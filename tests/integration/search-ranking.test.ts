// Issue 14 §4, "Search that lands on the thing": procedures and their specs rank above single
// readings for the same words (the index's ranking rule `kindWeight:desc` after words and typo,
// and one typo from four letters), readings come as one hit per recording listing the readings
// that matched, and every hit points at its place (`#spec-…`, `#reading-…`, `?t=`).
import { randomUUID } from "node:crypto";
import { eq, isNull, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { procedureRevisions, procedures, procedureSpecs, readings, recordings, searchOutbox } from "~/db/schema";
import { db } from "~/lib/db.server";
import { HL_POST, HL_PRE } from "~/lib/search/highlight";
import { createUser, http, waitFor } from "../support/app";

type Hit = {
  id: string;
  kind: string;
  title: string;
  url: string;
  t?: number;
  readings?: { id: string; text: string; url: string; t?: number }[];
  moreReadings?: number;
};

const DEMO_RECORDING = "5eed0000-0000-4000-8000-00000000c1a9";
const STUDS_SLUG = "head-stud-installation-and-torque-sequence";
const plain = (s: string) => s.replaceAll(HL_PRE, "").replaceAll(HL_POST, "");
const word = () => `zr${randomUUID().replace(/-/g, "").slice(0, 10)}`;

async function search(cookie: string, q: string, extra = ""): Promise<Hit[]> {
  const res = await http(`/api/search?limit=50&q=${encodeURIComponent(q)}${extra}`, { cookie });
  expect(res.status).toBe(200);
  return ((await res.json()) as { hits: Hit[] }).hits;
}

async function indexed() {
  await waitFor(async () => {
    const [r] = await db().select({ n: sql<number>`count(*)::int` }).from(searchOutbox).where(isNull(searchOutbox.doneAt));
    return r.n === 0;
  }, 30_000);
}

describe("search ranking and landing", () => {
  // Other test files publish procedures of their own with the same words (a renamed "Head stud
  // installation …" copy), so these checks judge order by kind, not absolute places.
  const TOP_KINDS = new Set(["procedure", "spec"]);

  it("“head stud torque moly” (demo shop): the procedure and its spec “Head stud final torque” rank above every reading, mark and recording", async () => {
    const builder = await createUser("builder");
    await indexed();
    const hits = await search(builder.cookie, "head stud torque moly");
    const seen = JSON.stringify(hits.map((h) => [h.kind, plain(h.title)]));
    const procedure = hits.findIndex((h) => h.kind === "procedure" && h.url.startsWith(`/procedures/${STUDS_SLUG}`));
    const spec = hits.findIndex((h) => h.kind === "spec" && plain(h.title) === "Head stud final torque");
    expect(procedure, seen).toBeGreaterThanOrEqual(0);
    expect(spec, seen).toBeGreaterThanOrEqual(0);
    // Nothing of a lower kind (readings, marks, recordings, test records) comes before either.
    expect(
      hits.slice(0, Math.max(procedure, spec)).every((h) => TOP_KINDS.has(h.kind)),
      seen,
    ).toBe(true);
    expect(spec, seen).toBeLessThan(5);
    // Of the demo procedure's specs, the one about torque with moly comes first (the procedure's
    // tags do not give every spec all the words).
    expect(plain(hits.find((h) => h.kind === "spec" && h.url.startsWith(`/procedures/${STUDS_SLUG}#`))!.title)).toBe(
      "Head stud final torque",
    );
    // The spec hit opens the procedure at the spec.
    expect(hits[spec].url).toBe(`/procedures/${STUDS_SLUG}#spec-studs-final`);
  });

  it("“torqe mloy” (two typos, one in a four-letter word): the head stud procedure is among the first three, above every lower kind", async () => {
    const builder = await createUser("builder");
    await indexed();
    const hits = await search(builder.cookie, "torqe mloy");
    const seen = JSON.stringify(hits.slice(0, 8).map((h) => [h.kind, plain(h.title)]));
    const at = hits.findIndex((h) => h.kind === "procedure" && h.url.startsWith(`/procedures/${STUDS_SLUG}`));
    expect(at, seen).toBeGreaterThanOrEqual(0);
    expect(
      hits.slice(0, at).every((h) => TOP_KINDS.has(h.kind)),
      seen,
    ).toBe(true);
    // Before it at most two of the demo's procedures and specs that hold the same words. Other
    // test files publish head-stud procedures and "Final torque" specs of their own in the shared
    // database, so only the demo's (created by the seeded people, ids "demo-…") are counted.
    const demoSlugs = new Set(
      (await db().select({ slug: procedures.slug }).from(procedures).where(sql`${procedures.createdBy} like 'demo-%'`)).map((r) => r.slug),
    );
    const slugOf = (url: string) => /^\/procedures\/([^/#?]+)/.exec(url)?.[1] ?? "";
    expect(demoSlugs.has(STUDS_SLUG)).toBe(true);
    expect(hits.slice(0, at).filter((h) => demoSlugs.has(slugOf(h.url))).length, seen).toBeLessThanOrEqual(2);
  });

  it("the demo recording's twelve readings are one hit, listing those that matched, each opening the recording at its reading", async () => {
    const builder = await createUser("builder");
    await indexed();
    const hits = await search(builder.cookie, "head stud torque moly", "&type=reading");
    const demo = hits.filter((h) => h.url.startsWith(`/recordings/${DEMO_RECORDING}`));
    expect(demo).toHaveLength(1);
    const hit = demo[0];
    expect(hit.kind).toBe("reading");
    const listed = hit.readings ?? [];
    expect(listed.length).toBeGreaterThan(0);
    expect(listed.length + (hit.moreReadings ?? 0)).toBeGreaterThanOrEqual(6); // the torque readings at least
    for (const r of listed) {
      expect(r.text).toContain(HL_PRE);
      expect(r.url).toMatch(new RegExp(`^/recordings/${DEMO_RECORDING}\\?t=[0-9.]+#reading-${r.id}$`));
    }
    expect(hit.url).toBe(listed[0].url);
  });

  it("readings of one recording group into one hit, ranked below a procedure and its spec for the same words; a deleted reading leaves the list", async () => {
    const builder = await createUser("builder");
    const qc = await createUser("qc");
    const term = word();
    const slug = `p-${randomUUID().slice(0, 8)}`;
    await db().transaction(async (tx) => {
      const [p] = await tx
        .insert(procedures)
        .values({ slug, title: `Rod bolt stretch ${term}`, area: "assembly", createdBy: builder.id })
        .returning();
      const doc = {
        type: "doc",
        content: [{ type: "paragraph", content: [{ type: "text", text: `Stretch the rod bolts to the figure, ${term} on the threads.` }] }],
      };
      const [rev] = await tx
        .insert(procedureRevisions)
        .values({
          procedureId: p.id,
          number: 1,
          state: "published",
          title: `Rod bolt stretch ${term}`,
          summary: "",
          area: "assembly",
          tags: [`tag ${term}`],
          doc,
          authorId: builder.id,
          publishedAt: new Date(),
        })
        .returning();
      await tx.insert(procedureSpecs).values({
        revisionId: rev.id,
        procedureId: p.id,
        specKey: "stretch",
        position: 0,
        label: `Rod bolt stretch ${term}`,
        quantity: "length",
        unit: "mm",
        min: 0.15,
        max: 0.17,
        siUnit: "m",
      });
    });
    const [rec] = await db()
      .insert(recordings)
      .values({
        title: `Rod bolt bench ${term}`,
        originalName: "clip.mp4",
        originalSize: 1000,
        state: "ready",
        uploadedBy: qc.id,
        durationS: 120,
      })
      .returning();
    const rows = await db()
      .insert(readings)
      .values(
        Array.from({ length: 8 }, (_, i) => ({
          recordingId: rec.id,
          quantity: "length",
          label: `rod bolt stretch ${i + 1} ${term}`,
          valueEntered: 0.16,
          unitEntered: "mm",
          valueSi: 0.00016,
          t: 10 + i,
          createdBy: qc.id,
        })),
      )
      .returning();
    await indexed();

    const hits = await search(builder.cookie, `rod bolt stretch ${term}`);
    // The procedure and its spec, then the readings (all four words), then the recording (“stretch” missing).
    expect(
      hits
        .slice(0, 2)
        .map((h) => h.kind)
        .sort(),
    ).toEqual(["procedure", "spec"]);
    expect(hits.slice(2).map((h) => h.kind)).toEqual(["reading", "recording"]);
    expect(hits.find((h) => h.kind === "spec")!.url).toBe(`/procedures/${slug}#spec-stretch`);
    const group = hits[2];
    expect(group.title).toBe(`Rod bolt bench ${term}`);
    expect(group.readings).toHaveLength(5);
    expect(group.moreReadings).toBe(3);
    expect(group.readings!.map((r) => r.id)).toEqual(rows.slice(0, 5).map((r) => r.id)); // in the recording's order
    expect(group.readings![0]).toEqual({
      id: rows[0].id,
      t: 10,
      url: `/recordings/${rec.id}?t=10#reading-${rows[0].id}`,
      text: expect.stringContaining(`${HL_PRE}${term}${HL_POST}`),
    });

    // The procedure's tag filters its specs too.
    expect((await search(builder.cookie, "", `&tag=${encodeURIComponent(`tag ${term}`)}`)).map((h) => h.kind).sort()).toEqual([
      "procedure",
      "spec",
    ]);

    // A reading deleted: its recording is rebuilt (the trigger queues the recording), the list shrinks.
    await db().delete(readings).where(eq(readings.id, rows[0].id));
    await indexed();
    const after = (await search(builder.cookie, `rod bolt stretch ${term}`, "&type=reading"))[0];
    expect(after.readings!.map((r) => r.id)).toEqual(rows.slice(1, 6).map((r) => r.id));
    expect(after.moreReadings).toBe(2);
  });

  it("the search page says in words that nothing was found, and what to try", async () => {
    const builder = await createUser("builder");
    const term = `${word()} ${word()}`; // found nowhere
    const res = await http(`/search?q=${encodeURIComponent(term)}`, { cookie: builder.cookie });
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain(`Nothing found for “${term}”`);
    expect(html).toContain("Try fewer words, or another word for the same thing");
    expect(html).not.toContain("No matches.");
  });
});
