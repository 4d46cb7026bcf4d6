/**
 * Search benchmark (run by `npm run bench`, against the stack that script starts):
 *   - indexes 20,000 synthetic documents (Zipf words; a quarter long procedures, the rest
 *     short marks and readings) into the app's index through the SDK, timed;
 *   - search as you type: 5 people (5 apprentices, each on their own connection) type queries
 *     into the header box at once; each pause sends GET /api/search?limit=12&q=<what is typed so
 *     far>, as the box does, through the whole app (React Router, its middleware, the session,
 *     the search service). Two rounds:
 *       - as typed (the target): the box asks only after 180 ms without a key, so each person
 *         sends at that fastest pace, without waiting for answers;
 *       - back to back: each person sends the next request as soon as the previous one is
 *         answered, so 5 are in flight all the time, far faster than anyone types (what the
 *         stack does saturated; informative).
 *     p50/p95 overall and per kind of query, the search service's share of each answer, the CPU
 *     the app and the search fake spend per answer, and the database queries each answer made
 *     (the root middleware's Server-Timing);
 *   - a full reindex of 20,000 marks stored in PostgreSQL.
 */
import { randomUUID } from "node:crypto";
import os from "node:os";
import { sql } from "drizzle-orm";
import { Meilisearch } from "meilisearch";
import { marks, recordings, searchOutbox } from "~/db/schema";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { indexUid, KIND_WEIGHT, searchErrorMessage, type SearchDoc } from "~/lib/search/client.server";
import { reindexAll, repairIndex, withSearchLock } from "~/lib/search/indexer.server";
import { createUser, http } from "../../tests/support/app";
import { benchQueries, generateCorpus, rng } from "../fakes/meili/bench";
import { cpuMs, listenerPid, rssBytes } from "./proc";

type Stat = { p50: number; p95: number; samples: number };
const stat = (xs: number[]): Stat => {
  const s = [...xs].sort((a, b) => a - b);
  const at = (q: number) => s[Math.min(s.length - 1, Math.floor(q * s.length))];
  return { p50: +at(0.5).toFixed(2), p95: +at(0.95).toFixed(2), samples: s.length };
};

const TYPISTS = 5;
/** The header box's wait for a pause in typing before it asks (HeaderSearch.tsx). */
const BOX_PAUSE_MS = 180;
/** Requests each person sends in the as-typed round (about 45 s at the box's fastest pace). */
const TYPED_PER_PERSON = 250;

/** Resident memory of the search fake (the process listening on MEILI_HOST's port), in MB of 10^6 bytes. */
function searchFakeRssMB(): number | null {
  const pid = listenerPid(Number(new URL(env().MEILI_HOST!).port));
  const bytes = pid ? rssBytes(pid) : null;
  return bytes === null ? null : Math.round(bytes / 1e6);
}

/** What the header box sends while `q` is typed: a pause every few letters and at the end. */
function asTyped(q: string): string[] {
  const out: string[] = [];
  for (let n = 3; n < q.length; n += 3) if (q[n - 1] !== " ") out.push(q.slice(0, n));
  out.push(q);
  return out;
}

export async function benchSearch(opts: { docs?: number; samples?: number; log?: (s: string) => void } = {}) {
  const log = opts.log ?? console.log;
  const N = opts.docs ?? 20_000;
  const corpus = generateCorpus({ docs: N });
  const queries = benchQueries(corpus, opts.samples ?? 40);
  const now = Date.now();
  // Procedure documents are shaped as the app writes a revision's: the summary in `text`, the
  // blocks (about 80 words each here) one per line in `body`.
  const docs: SearchDoc[] = corpus.docs.map((d) => ({
    id: d.kind === "procedure" ? `rev-${randomUUID()}` : `bench-${d.id}`,
    kind: d.kind,
    title: d.title,
    text: d.kind === "procedure" ? "" : d.body,
    body: d.kind === "procedure" ? (d.body.match(/(?:\S+\s+){0,80}\S+/g) ?? [d.body]).join("\n") : undefined,
    tags: d.tags,
    visibility: ["all"],
    url: "/",
    date: now,
    kindWeight: KIND_WEIGHT[d.kind],
  }));

  // The worker's index check rebuilds a fresh service's index from PostgreSQL once, which also
  // removes documents that are not in the database, such as these. Let it happen first.
  await new Promise((r) => setTimeout(r, env().SEARCH_CHECK_MS * 1.5));
  await withSearchLock(async () => {});
  await repairIndex();

  // Indexing through the SDK into the app's index, timed until every task succeeded. The fake
  // indexes on its one thread, so a task poll may wait long on a busy machine: a generous limit.
  // A poll that fails (a socket the busy fake dropped) is asked again.
  const client = new Meilisearch({ host: env().MEILI_HOST!, apiKey: env().MEILI_API_KEY, timeout: 120_000 });
  const index = client.index<SearchDoc>(indexUid());
  const finished = async (uid: number) => {
    for (let tries = 1; ; tries++) {
      try {
        return await client.tasks.waitForTask(uid, { timeout: 600_000, interval: 20 });
      } catch (err) {
        if (tries === 5) throw err;
        log(`polling task ${uid} failed (${searchErrorMessage(err)}: ${String((err as { cause?: unknown }).cause)}); asking again`);
      }
    }
  };
  const t0 = performance.now();
  for (let i = 0; i < docs.length; i += 1000) {
    const enqueued = await index.addDocuments(docs.slice(i, i + 1000), { primaryKey: "id" });
    const task = await finished(enqueued.taskUid);
    if (task.status !== "succeeded") throw new Error(`indexing failed: ${task.error?.message}`);
  }
  const indexingMs = performance.now() - t0;
  const held = (await index.getStats()).numberOfDocuments;
  if (held < N) throw new Error(`the index holds ${held} documents after indexing ${N}: something removed some`);
  log(`indexed ${N} documents through the SDK in ${(indexingMs / 1000).toFixed(1)} s`);
  const fakeRssMB = searchFakeRssMB();
  log(`the search fake's resident memory after indexing: ${fakeRssMB ?? "?"} MB`);

  const people = await Promise.all(Array.from({ length: TYPISTS }, (_, i) => createUser("apprentice", { name: `Bench Typist ${i + 1}` })));
  const ask = async (cookie: string, q: string) => {
    const a = performance.now();
    const res = await http(`/api/search?limit=12&q=${encodeURIComponent(q)}`, { cookie });
    await res.arrayBuffer();
    const ms = performance.now() - a;
    if (res.status !== 200) throw new Error(`/api/search answered ${res.status} for "${q}"`);
    const timing = res.headers.get("server-timing") ?? "";
    const queries = /\bdb;desc="(\d+) quer/.exec(timing);
    // The app's own measure of the search service's answer (the SDK call, request to response).
    const service = /\bsearch;dur=([\d.]+)/.exec(timing);
    return { ms, queries: queries ? Number(queries[1]) : 0, serviceMs: service ? Number(service[1]) : Number.NaN };
  };

  // A warm-up round over a few queries of every kind: the first measured must not pay for the
  // indexing just done (collections in the fake, code not yet compiled in the app).
  for (const list of Object.values(queries))
    for (const q of list.slice(0, 5)) for (const typed of asTyped(q)) await ask(people[0].cookie, typed);

  // Every person types every kind's queries, each starting at another point of the list.
  const kinds = Object.entries(queries);
  const typedBy = (p: number) =>
    kinds.flatMap((_, i) => {
      const [kind, list] = kinds[(i + p) % kinds.length];
      return list.flatMap((q) => asTyped(q).map((typed) => ({ kind, typed })));
    });
  const appPid = process.env.BENCHREEL_APP_PID ? Number(process.env.BENCHREEL_APP_PID) : null;
  const fakePid = listenerPid(Number(new URL(env().MEILI_HOST!).port));
  const cpuOf = (pid: number | null) => (pid ? cpuMs(pid) : null);

  /**
   * One round: every person's answers timed (request sent → body read), per kind, with the
   * search service's share (the SDK call, from the app's Server-Timing) and the rest (the app:
   * React Router, its middleware, the session and the outbox count, shaping, the connection),
   * and the CPU the app and the fake spent per answer. `send` decides when a person sends.
   */
  const round = async (
    send: (person: (typeof people)[number], p: number, one: (kind: string, typed: string) => Promise<void>) => Promise<void>,
  ) => {
    const times: Record<string, number[]> = Object.fromEntries(kinds.map(([k]) => [k, []]));
    const all: number[] = [];
    const queriesPerAnswer: number[] = [];
    const serviceTimes: number[] = [];
    const appTimes: number[] = [];
    const load0 = os.loadavg()[0];
    const cpu0 = [cpuOf(appPid), cpuOf(fakePid)];
    const t0 = performance.now();
    await Promise.all(
      people.map((person, p) =>
        send(person, p, async (kind, typed) => {
          const { ms, queries: n, serviceMs } = await ask(person.cookie, typed);
          times[kind].push(ms);
          if (Number.isFinite(serviceMs)) {
            serviceTimes.push(serviceMs);
            appTimes.push(ms - serviceMs);
          }
          all.push(ms);
          queriesPerAnswer.push(n);
        }),
      ),
    );
    const seconds = (performance.now() - t0) / 1000;
    const cpu1 = [cpuOf(appPid), cpuOf(fakePid)];
    const perAnswer = (i: number) => (cpu0[i] == null || cpu1[i] == null ? null : +((cpu1[i]! - cpu0[i]!) / all.length).toFixed(2));
    return {
      overall: stat(all),
      cases: Object.fromEntries(Object.entries(times).map(([k, v]) => [k, stat(v)])),
      split: { service: stat(serviceTimes), app: stat(appTimes) },
      cpuMsPerAnswer: { app: perAnswer(0), searchFake: perAnswer(1) },
      answersPerSecond: +(all.length / seconds).toFixed(1),
      dbQueriesPerAnswer: { min: Math.min(...queriesPerAnswer), max: Math.max(...queriesPerAnswer) },
      loadAverage: [+load0.toFixed(2), +os.loadavg()[0].toFixed(2)],
    };
  };
  const report = (name: string, r: Awaited<ReturnType<typeof round>>) => {
    for (const [k, s] of Object.entries(r.cases)) log(`${name} ${k.padEnd(18)} p50 ${s.p50} ms, p95 ${s.p95} ms (${s.samples})`);
    const { service, app } = r.split;
    log(
      `${name} of each answer: the search service p50 ${service.p50}, p95 ${service.p95} ms; the rest (the app and the connection) p50 ${app.p50}, p95 ${app.p95} ms; CPU an answer: the app ${r.cpuMsPerAnswer.app ?? "?"} ms, the search fake ${r.cpuMsPerAnswer.searchFake ?? "?"} ms`,
    );
    log(
      `${name} all kinds: p50 ${r.overall.p50} ms, p95 ${r.overall.p95} ms over ${r.overall.samples} answers, ${r.answersPerSecond} a second; ${r.dbQueriesPerAnswer.min}–${r.dbQueriesPerAnswer.max} database queries an answer; load average ${r.loadAverage[0]} → ${r.loadAverage[1]}`,
    );
  };

  // As people type: the header box sends only after a pause of BOX_PAUSE_MS without a key, so
  // one person's requests are at least that far apart whatever the answers do, and a person
  // does not wait for an answer to type on. Each person sends at that fastest pace, starting at
  // a random moment of the first pause (seeded), for TYPED_PER_PERSON requests.
  const phase = rng(11);
  const typing = await round(async (_person, p, one) => {
    const list = typedBy(p).slice(0, TYPED_PER_PERSON);
    const start = performance.now() + phase() * BOX_PAUSE_MS;
    const pending: Promise<void>[] = [];
    for (let k = 0; k < list.length; k++) {
      const wait = start + k * BOX_PAUSE_MS - performance.now();
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
      pending.push(one(list[k].kind, list[k].typed));
    }
    await Promise.all(pending);
  });
  report("as typed:", typing);

  // Back to back: each person sends the next request as soon as the answer arrives, so five are
  // in flight all the time (far faster than anyone types): what the stack does saturated.
  const backToBack = await round(async (_person, p, one) => {
    for (const { kind, typed } of typedBy(p)) await one(kind, typed);
  });
  report("back to back:", backToBack);

  // Full reindex from PostgreSQL of 20,000 stored marks.
  const owner = people[0];
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: "Benchmark recording",
      originalName: "bench.mp4",
      originalSize: 1,
      state: "ready",
      uploadedBy: owner.id,
      durationS: 3600,
    })
    .returning();
  const short = corpus.docs.filter((d) => d.kind !== "procedure");
  for (let i = 0; i < N; i += 2000) {
    await db()
      .insert(marks)
      .values(
        Array.from({ length: Math.min(2000, N - i) }, (_, j) => ({
          id: randomUUID(),
          recordingId: rec.id,
          tStart: (i + j) % 3600,
          text: short[(i + j) % short.length].body,
          createdBy: owner.id,
        })),
      );
  }
  await db().update(searchOutbox).set({ doneAt: new Date() }).where(sql`${searchOutbox.doneAt} is null`); // the rebuild below covers them
  const r0 = performance.now();
  const rebuilt = await reindexAll();
  const reindexMs = performance.now() - r0;
  log(`full reindex: ${rebuilt.documents} documents written, ${rebuilt.removed} stale removed in ${(reindexMs / 1000).toFixed(1)} s`);

  return {
    docs: N,
    indexingMs: Math.round(indexingMs),
    fakeRssMB,
    typists: TYPISTS,
    boxPauseMs: BOX_PAUSE_MS,
    asTyped: typing,
    backToBack,
    reindex: { documents: rebuilt.documents, ms: Math.round(reindexMs) },
    targets: {
      "/api/search p95 ≤ 30 ms, 5 typing at once, 20,000 documents": { value: typing.overall.p95, ok: typing.overall.p95 <= 30 },
      "search fake's memory after indexing 20,000 < 500 MB": { value: fakeRssMB, ok: fakeRssMB !== null && fakeRssMB < 500 },
      "full reindex of 20,000 ≤ 15 s": { value: +(reindexMs / 1000).toFixed(1), ok: reindexMs <= 15_000 },
    },
  };
}
