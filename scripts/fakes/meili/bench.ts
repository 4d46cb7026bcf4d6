/**
 * Benchmark of the search fake: indexes N synthetic documents (words drawn from a Zipf
 * distribution over an invented vocabulary; a quarter long "procedures" of 500–3000 words,
 * the rest short "marks" and "readings" of 10–40 words), then measures p50/p95 latency of
 * searches
 *   - through the `meilisearch` SDK against the fake on loopback (`sdk`),
 *   - of the fake's own search in-process, without HTTP (`engine`, the "raw fake query"),
 *   - of a plain MiniSearch index over the same documents (`minisearch`, optional baseline),
 * for one-word, three-word and typo queries on mid-frequency and on the commonest terms.
 *
 *   import { runMeiliBench } from "./scripts/fakes/meili/bench";
 *   const result = await runMeiliBench({ docs: 20_000 });
 *
 *   tsx scripts/fakes/meili/bench.ts [--docs 20000] [--samples 60] [--no-baseline] [--json]
 *
 * Every loop is bounded; the fake listens on 127.0.0.1 only. `generateCorpus` and
 * `benchQueries` are exported so that the app's benchmark can send the same documents and
 * queries through /api/search.
 */
import os from "node:os";
import v8 from "node:v8";
import { Meilisearch } from "meilisearch";
import MiniSearch from "minisearch";
import { startMeiliFake } from "./server";
import { tokenize } from "./tokenizer";

export type BenchDoc = { id: string; kind: "procedure" | "mark" | "reading"; title: string; tags: string[]; body: string };
export type Corpus = { docs: BenchDoc[]; vocabulary: string[]; df: Map<string, number> };
export type Stat = { p50: number; p95: number; mean: number; samples: number };
export type BenchCase = {
  queries: string[];
  sdk: Stat;
  engine: Stat;
  minisearch?: Stat;
  ratioSdkToEngineP95: number;
  meanEstimatedTotalHits: number;
};
export type BenchResult = {
  docs: number;
  vocabulary: number;
  longDocs: number;
  totalWords: number;
  indexing: { ms: number; docsPerSecond: number; minisearchMs?: number };
  memory: { heapUsedMB: number; fakeHeapDeltaMB: number; rssMB: number };
  /** Load average (1 min) at the start and the end, and CPUs: latencies on a busy machine are inflated. */
  machine: { cpus: number; loadBefore: number; loadAfter: number };
  cases: Record<string, BenchCase>;
  targets: Record<string, { limit: number; value: number; ok: boolean }>;
};

/** Deterministic PRNG (mulberry32). */
export function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const SYLLABLES = [
  "ka",
  "ro",
  "mi",
  "te",
  "lu",
  "sa",
  "no",
  "vi",
  "de",
  "ra",
  "po",
  "zu",
  "fe",
  "li",
  "go",
  "ta",
  "be",
  "ni",
  "xo",
  "qu",
  "sha",
  "dre",
  "kel",
  "mor",
  "tin",
  "vas",
  "bru",
  "ple",
  "gan",
  "sor",
];

/** Invented words only, so that no real term (or product) is ever part of the data. */
export function generateCorpus(opts: { docs?: number; vocabulary?: number; seed?: number } = {}): Corpus {
  const N = opts.docs ?? 20_000;
  const V = opts.vocabulary ?? 6_000;
  const rand = rng(opts.seed ?? 42);
  const vocabulary: string[] = [];
  const seen = new Set<string>();
  for (let guard = 0; vocabulary.length < V && guard < V * 50; guard++) {
    const n = 2 + Math.floor(rand() * 3);
    let w = "";
    for (let i = 0; i < n; i++) w += SYLLABLES[Math.floor(rand() * SYLLABLES.length)];
    if (!seen.has(w)) {
      seen.add(w);
      vocabulary.push(w);
    }
  }
  // Zipf (s = 1) by inverse CDF
  const cdf = new Float64Array(vocabulary.length);
  let acc = 0;
  for (let i = 0; i < vocabulary.length; i++) cdf[i] = acc += 1 / (i + 1);
  const pick = () => {
    const r = rand() * acc;
    let lo = 0;
    let hi = cdf.length - 1;
    while (lo < hi) {
      const m = (lo + hi) >> 1;
      if (cdf[m] < r) lo = m + 1;
      else hi = m;
    }
    return vocabulary[lo];
  };
  const words = (n: number) => Array.from({ length: n }, pick);
  const df = new Map<string, number>();
  const docs: BenchDoc[] = [];
  for (let i = 0; i < N; i++) {
    const long = i % 4 === 0;
    const kind = long ? "procedure" : i % 4 === 1 ? "reading" : "mark";
    const bodyLen = long ? 500 + Math.floor(rand() * 2501) : 10 + Math.floor(rand() * 31);
    const doc: BenchDoc = {
      id: `d${i}`,
      kind,
      title: words(3 + Math.floor(rand() * 5)).join(" "),
      tags: words(2),
      body: words(bodyLen).join(" "),
    };
    for (const w of new Set([...doc.title.split(" "), ...doc.tags, ...doc.body.split(" ")])) df.set(w, (df.get(w) ?? 0) + 1);
    docs.push(doc);
  }
  return { docs, vocabulary, df };
}

/** A one-character substitution inside the word (a typo the fake must forgive). */
function typo(word: string, rand: () => number) {
  const i = 1 + Math.floor(rand() * (word.length - 2));
  const c = word[i] === "a" ? "e" : "a";
  return word.slice(0, i) + c + word.slice(i + 1);
}

/** The query sets: mid-frequency terms (in 3–12% of documents) and the commonest terms. */
export function benchQueries(corpus: Corpus, samples = 60, seed = 7): Record<string, string[]> {
  const rand = rng(seed);
  const N = corpus.docs.length;
  const byDf = [...corpus.df.entries()].sort((a, b) => b[1] - a[1]);
  const common = byDf.slice(0, 5).map(([w]) => w);
  let mid = byDf.filter(([, d]) => d >= N * 0.03 && d <= N * 0.12).map(([w]) => w);
  if (mid.length < 10) mid = byDf.slice(Math.floor(byDf.length * 0.02), Math.floor(byDf.length * 0.05) + 10).map(([w]) => w);
  const longEnough = (ws: string[]) => ws.filter((w) => w.length >= 6);
  const anyOf = (ws: string[]) => ws[Math.floor(rand() * ws.length)];
  const gen = (f: () => string) => Array.from({ length: samples }, f);
  const midTypo = longEnough(mid).length ? longEnough(mid) : mid;
  const commonTypo = longEnough(byDf.slice(0, 30).map(([w]) => w));
  return {
    "one-word mid": gen(() => anyOf(mid)),
    "one-word common": gen(() => anyOf(common)),
    "three-word mid": gen(() => [anyOf(mid), anyOf(mid), anyOf(mid)].join(" ")),
    "three-word common": gen(() => [anyOf(common), anyOf(common), anyOf(common)].join(" ")),
    "typo mid": gen(() => typo(anyOf(midTypo), rand)),
    "typo common": gen(() => typo(anyOf(commonTypo.length ? commonTypo : common), rand)),
  };
}

function stat(xs: number[]): Stat {
  const s = [...xs].sort((a, b) => a - b);
  const q = (p: number) => s[Math.min(s.length - 1, Math.max(0, Math.ceil(p * s.length) - 1))];
  const r = (x: number) => Math.round(x * 100) / 100;
  return { p50: r(q(0.5)), p95: r(q(0.95)), mean: r(s.reduce((a, b) => a + b, 0) / s.length), samples: s.length };
}

/**
 * What the app's search box asks for: a page of 20 with the short fields, the title
 * highlighted and the body as a highlighted, cropped snippet (not the whole body), and facets.
 */
export const BENCH_SEARCH = {
  limit: 20,
  attributesToRetrieve: ["id", "kind", "title", "tags"],
  attributesToHighlight: ["title", "body"],
  attributesToCrop: ["body"],
  cropLength: 30,
  facets: ["kind", "tags"],
};

export async function runMeiliBench(
  opts: { docs?: number; vocabulary?: number; samples?: number; baseline?: boolean; seed?: number; log?: (line: string) => void } = {},
): Promise<BenchResult> {
  const log = opts.log ?? (() => {});
  const corpus = generateCorpus({ docs: opts.docs, vocabulary: opts.vocabulary, seed: opts.seed });
  const N = corpus.docs.length;
  const totalWords = corpus.docs.reduce((a, d) => a + d.body.split(" ").length + d.title.split(" ").length + 2, 0);
  log(`corpus: ${N} documents, ${totalWords} words, vocabulary ${corpus.vocabulary.length}`);
  const queries = benchQueries(corpus, opts.samples ?? 60);

  const loadBefore = Math.round(os.loadavg()[0] * 100) / 100;
  const heapBefore = v8.getHeapStatistics().used_heap_size;
  const fake = await startMeiliFake({ port: 0, host: "127.0.0.1" });
  try {
    const client = new Meilisearch({ host: fake.url, defaultWaitOptions: { timeout: 600_000, interval: 20 } });
    const index = client.index<BenchDoc>("bench");
    await client.createIndex("bench", { primaryKey: "id" }).waitTask();
    await index.updateSettings({ searchableAttributes: ["title", "tags", "body"], filterableAttributes: ["kind", "tags"] }).waitTask();

    const t0 = performance.now();
    const tasks = [];
    for (let i = 0; i < N; i += 500) tasks.push(await index.addDocuments(corpus.docs.slice(i, i + 500)));
    const done = await client.tasks.waitForTasks(tasks, { timeout: 600_000, interval: 20 });
    const indexMs = performance.now() - t0;
    const failed = done.filter((t) => t.status !== "succeeded");
    if (failed.length) throw new Error(`indexing failed: ${JSON.stringify(failed[0].error)}`);
    log(`indexed through the SDK in ${Math.round(indexMs)} ms`);
    const heapAfter = v8.getHeapStatistics().used_heap_size;
    const memory = {
      heapUsedMB: Math.round(heapAfter / 1e6),
      fakeHeapDeltaMB: Math.round((heapAfter - heapBefore) / 1e6),
      rssMB: Math.round(process.memoryUsage().rss / 1e6),
    };

    const engine = fake.store.getIndex("bench");
    const cases: Record<string, BenchCase> = {};
    // warm up both paths
    for (const q of Object.values(queries).flat().slice(0, 30)) {
      await index.search(q, BENCH_SEARCH);
      engine.search({ q, ...BENCH_SEARCH });
    }
    for (const [name, qs] of Object.entries(queries)) {
      const sdk: number[] = [];
      const eng: number[] = [];
      let hits = 0;
      for (const q of qs) {
        const a = performance.now();
        const r = await index.search(q, BENCH_SEARCH);
        sdk.push(performance.now() - a);
        hits += r.estimatedTotalHits ?? 0;
        const b = performance.now();
        engine.search({ q, ...BENCH_SEARCH });
        eng.push(performance.now() - b);
      }
      const s = stat(sdk);
      const e = stat(eng);
      cases[name] = {
        queries: qs.slice(0, 3),
        sdk: s,
        engine: e,
        ratioSdkToEngineP95: Math.round((s.p95 / Math.max(e.p95, 0.01)) * 100) / 100,
        meanEstimatedTotalHits: Math.round(hits / qs.length),
      };
      log(
        `${name.padEnd(18)} sdk p50 ${s.p50} p95 ${s.p95} ms | engine p50 ${e.p50} p95 ${e.p95} ms | ~${cases[name].meanEstimatedTotalHits} hits`,
      );
    }

    let minisearchMs: number | undefined;
    if (opts.baseline !== false) {
      // the same documents in a plain MiniSearch, with the fake's tokenizer, scoring every match
      const t1 = performance.now();
      const ms = new MiniSearch<BenchDoc>({
        fields: ["title", "tags", "body"],
        storeFields: [],
        tokenize: (text) => tokenize(text),
        processTerm: (t) => t,
        extractField: (doc, f) => {
          const v = doc[f as keyof BenchDoc];
          return Array.isArray(v) ? v.join(" ") : String(v);
        },
      });
      ms.addAll(corpus.docs);
      minisearchMs = performance.now() - t1;
      log(`minisearch baseline indexed in ${Math.round(minisearchMs)} ms`);
      for (const [name, qs] of Object.entries(queries)) {
        const xs: number[] = [];
        for (const q of qs) {
          const a = performance.now();
          ms.search(q, {
            prefix: (_t, i, terms) => i === terms.length - 1,
            fuzzy: (t) => (t.length >= 9 ? 2 : t.length >= 5 ? 1 : 0),
            combineWith: "OR",
          });
          xs.push(performance.now() - a);
        }
        cases[name].minisearch = stat(xs);
        log(`${name.padEnd(18)} minisearch p50 ${cases[name].minisearch!.p50} p95 ${cases[name].minisearch!.p95} ms`);
      }
    }

    const midP95 = Math.max(...["one-word mid", "three-word mid", "typo mid"].map((k) => cases[k].sdk.p95));
    const commonP95 = Math.max(...["one-word common", "three-word common", "typo common"].map((k) => cases[k].sdk.p95));
    const worstRatio = Math.max(...Object.values(cases).map((c) => c.ratioSdkToEngineP95));
    const targets = {
      "sdk p95 mid-frequency (ms)": { limit: 25, value: midP95, ok: midP95 <= 25 },
      "sdk p95 commonest terms (ms)": { limit: 60, value: commonP95, ok: commonP95 <= 60 },
      "indexing 20k docs (ms)": { limit: 15_000, value: Math.round(indexMs), ok: indexMs <= 15_000 * (N / 20_000) },
      "fake heap (MB)": { limit: 500, value: memory.fakeHeapDeltaMB, ok: memory.fakeHeapDeltaMB <= 500 },
      "sdk/engine p95 ratio (informative)": { limit: 1.5, value: worstRatio, ok: worstRatio <= 1.5 },
    };
    return {
      docs: N,
      vocabulary: corpus.vocabulary.length,
      longDocs: corpus.docs.filter((d) => d.kind === "procedure").length,
      totalWords,
      indexing: {
        ms: Math.round(indexMs),
        docsPerSecond: Math.round(N / (indexMs / 1000)),
        minisearchMs: minisearchMs && Math.round(minisearchMs),
      },
      memory,
      machine: { cpus: os.cpus().length, loadBefore, loadAfter: Math.round(os.loadavg()[0] * 100) / 100 },
      cases,
      targets,
    };
  } finally {
    await fake.close();
  }
}

// CLI
if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string) => {
    const i = process.argv.indexOf(`--${name}`);
    return i >= 0 ? process.argv[i + 1] : undefined;
  };
  const asJson = process.argv.includes("--json");
  const result = await runMeiliBench({
    docs: arg("docs") ? Number(arg("docs")) : undefined,
    samples: arg("samples") ? Number(arg("samples")) : undefined,
    baseline: !process.argv.includes("--no-baseline"),
    log: asJson ? undefined : (l) => console.log(`[meili-bench] ${l}`),
  });
  if (asJson) console.log(JSON.stringify(result, null, 2));
  else {
    console.log(`\nmachine: ${result.machine.cpus} CPUs, load average ${result.machine.loadBefore} → ${result.machine.loadAfter}`);
    console.log(
      `indexing: ${result.indexing.ms} ms (${result.indexing.docsPerSecond} docs/s); heap ${result.memory.heapUsedMB} MB (fake ≈ ${result.memory.fakeHeapDeltaMB} MB), rss ${result.memory.rssMB} MB`,
    );
    console.table(
      Object.fromEntries(
        Object.entries(result.cases).map(([k, c]) => [
          k,
          {
            "sdk p50": c.sdk.p50,
            "sdk p95": c.sdk.p95,
            "engine p50": c.engine.p50,
            "engine p95": c.engine.p95,
            "minisearch p50": c.minisearch?.p50,
            "minisearch p95": c.minisearch?.p95,
            "sdk/engine": c.ratioSdkToEngineP95,
            hits: c.meanEstimatedTotalHits,
          },
        ]),
      ),
    );
    for (const [k, t] of Object.entries(result.targets)) console.log(`${t.ok ? "ok  " : "MISS"} ${k}: ${t.value} (target ≤ ${t.limit})`);
  }
}
