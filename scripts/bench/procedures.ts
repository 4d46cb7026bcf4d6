/**
 * Procedures benchmark (run by `npm run bench -- procedures`, against the stack that script starts):
 *   - builds, through the domain module, a procedure whose published revision has about 3,000
 *     words and 10 embedded blocks (3 specs, 3 calculators, 2 cautions, a procedure link and a
 *     video moment), with 40 revisions in its history;
 *   - TTFB of its read page as a signed-in apprentice, every response rendered (there is no
 *     page cache): a sequential loop of fetches timed to the response headers (p50/p95), and
 *     autocannon with 20 concurrent clients (latency per response, p50/p95/p99, requests/s);
 *   - the database queries one render makes (the root middleware's Server-Timing);
 *   - the JavaScript the read page and the edit page ship, gzipped: every modulepreload and module
 *     script named in the served HTML, plus the static imports inside those files (lazy chunks,
 *     reachable only through import(), are counted apart).
 * Every request goes to the app on 127.0.0.1; the loops are bounded.
 */
import os from "node:os";
import { gzipSync } from "node:zlib";
import autocannon from "autocannon";
import { recordings } from "~/db/schema";
import { db } from "~/lib/db.server";
import type { JSONNode } from "~/lib/procedures/document";
import { createProcedure, saveDraft, startDraftFrom } from "~/lib/procedures/drafts.server";
import { publishRevision, submitRevision } from "~/lib/procedures/transitions.server";
import { createUser, type TestUser } from "../../tests/support/app";
import { cpuMs } from "./proc";

type Stat = { p50: number; p95: number; samples: number };
const stat = (xs: number[]): Stat => {
  const s = [...xs].sort((a, b) => a - b);
  const at = (q: number) => s[Math.min(s.length - 1, Math.floor(q * s.length))];
  return { p50: +at(0.5).toFixed(2), p95: +at(0.95).toFixed(2), samples: s.length };
};

// ---- the document ------------------------------------------------------------------------------

const t = (text: string, marks?: JSONNode["marks"]): JSONNode => ({ type: "text", text, ...(marks ? { marks } : {}) });
const p = (...c: (string | JSONNode)[]): JSONNode => ({ type: "paragraph", content: c.map((x) => (typeof x === "string" ? t(x) : x)) });
const h = (text: string, level = 2): JSONNode => ({ type: "heading", attrs: { level }, content: [t(text)] });
const steps = (items: string[]): JSONNode => ({
  type: "orderedList",
  attrs: { start: 1 },
  content: items.map((i) => ({ type: "listItem", content: [p(i)] })),
});
const caution = (...texts: string[]): JSONNode => ({ type: "caution", content: texts.map((x) => p(x)) });
const spec = (
  id: string,
  label: string,
  quantity: string,
  unit: string,
  nominal: number | null,
  min: number | null,
  max: number | null,
  note = "",
): JSONNode => ({
  type: "spec",
  attrs: { id, label, quantity, unit, nominal, min, max, note },
});
const calc = (kind: string, title: string, preset: Record<string, unknown>): JSONNode => ({
  type: "calculator",
  attrs: { kind, title, preset },
});

// Invented workshop prose (Larkspur Engine Works scenario), recombined into ~3,000 words.
const SENTENCES = [
  "Clean the block in the hot tank and blow every oil gallery out before any measuring starts.",
  "Let the block soak in the measuring room overnight so that it sits at the same temperature as the gauges.",
  "Zero the bore gauge on the setting ring for the 88.0 mm bore and check the zero again after every second cylinder.",
  "Fit the torque plate with a used head gasket of the same thickness as the one the engine will run.",
  "Torque the plate studs in the same passes and with the same lubricant as the cylinder head will get.",
  "Measure each bore at three depths and four angles, and write every number in the bore log as it is read.",
  "A reading that does not repeat within two microns is measured again before it is written down.",
  "Rough hone to within two hundredths of the finished size, then change to the plateau stones for the last passes.",
  "Keep the honing oil clean and flowing; a loaded stone cuts a taper into the bottom of the bore.",
  "After the final pass, wash the bores with hot soapy water and a stiff brush until a white cloth comes out clean.",
  "Oil the bores lightly at once, because a freshly honed iron liner rusts within the hour in a damp shop.",
  "Check the crosshatch angle against the shop's sample card and note it next to the cylinder's readings.",
  "The apprentice reads back each number to the builder, who checks it against the previous reading.",
  "Any bore that measures outside its limit is marked with a paint pen and goes back to the senior builder.",
  "Record the work order number, for example LEW-24-0117, on every sheet that leaves the bench.",
];
function prose(seed: number, words: number): string {
  const out: string[] = [];
  let n = 0;
  for (let i = 0; n < words; i++) {
    const s = SENTENCES[(seed * 7 + i * 3) % SENTENCES.length];
    out.push(s);
    n += s.split(/\s+/).length;
  }
  return out.join(" ");
}

function benchDoc(linkId: string, recordingId: string, variant: number): JSONNode {
  const section = (i: number): JSONNode[] => [
    h(`Stage ${i + 1}`),
    p(prose(i + variant, 100)),
    p(prose(i + variant + 5, 90)),
    steps([prose(i + 2, 25), prose(i + 3, 25), prose(i + 4, 25)]),
  ];
  const content: JSONNode[] = [
    caution(
      "The torque and machining values here are the shop's planning figures. The fastener maker's and the engine maker's published values take precedence; follow local codes and licensed practice.",
    ),
    h("Why"),
    p(prose(variant, 140)),
    ...section(0),
    spec("bench-bore-dia", "Bore diameter, plate fitted", "length", "mm", 88.0, 87.995, 88.01),
    ...section(1),
    spec("bench-bore-oor", "Out-of-round at any depth", "length", "mm", null, null, 0.008),
    ...section(2),
    calc("distortion", "Cylinder 2, plate fitted", {
      mode: "diametral",
      reference: { value: 88.0, unit: "mm" },
      readings: [0, 45, 90, 135].flatMap((a, i) =>
        [10, 50].map((d) => ({
          depth: { value: d, unit: "mm" },
          angleDeg: a,
          diameter: { value: [88.004, 88.007, 88.005, 88.002][i] + (d === 50 ? -0.001 : 0), unit: "mm" },
        })),
      ),
    }),
    ...section(3),
    calc("preload", "M12×1.5 plate studs, moly", {
      thread: "M12x1.5",
      direction: "torque-to-preload",
      torque: { value: 110, unit: "N.m" },
      method: { kind: "nut-factor", k: 0.14 },
      material: { propertyClass: "12.9" },
    }),
    spec("bench-stud-torque", "Plate stud final torque", "torque", "N.m", 110, 105, 115, "moly on threads and washer face"),
    ...section(4),
    caution("Do not hone without the plate fitted on the aluminium blocks: the bore will not be round under the head."),
    ...section(5),
    calc("clearance", "2618 piston in the 88.0 mm bore", {
      kind: "piston-to-wall",
      bore: { value: 88.0, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      spec: { min: { value: 0.06, unit: "mm" }, max: { value: 0.08, unit: "mm" } },
    }),
    ...section(6),
    {
      type: "videoMoment",
      attrs: { recordingId, start: 42, end: 75, caption: "Bore gauge zeroed on the setting ring, then cylinder 2 at 10 mm down" },
    },
    ...section(7),
    p("The plate studs are torqued to the head stud procedure: ", { type: "procedureLink", attrs: { procedureId: linkId } }, "."),
    ...section(8),
  ];
  return { type: "doc", content };
}

function countBlocks(doc: JSONNode): number {
  let n = 0;
  const visit = (x: JSONNode) => {
    if (["spec", "calculator", "caution", "procedureLink", "videoMoment"].includes(x.type)) n++;
    x.content?.forEach(visit);
  };
  visit(doc);
  return n;
}

// ---- set-up through the domain module ---------------------------------------------------------

async function publishNew(editor: TestUser, builder: TestUser, revisionId: string, note: string) {
  await submitRevision(builder, revisionId, note);
  await publishRevision(editor, revisionId);
}

export async function setUpBenchProcedure(log: (s: string) => void) {
  const builder = await createUser("builder", { name: "Bench Builder" });
  const editor = await createUser("editor", { name: "Bench Editor" });
  const apprentice = await createUser("apprentice", { name: "Bench Apprentice" });
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: "Bench: bore gauge on cylinder 2",
      originalName: "bench.mp4",
      originalSize: 1,
      state: "ready",
      uploadedBy: builder.id,
      durationS: 600,
    })
    .returning();

  const tag = Math.random().toString(36).slice(2, 8);
  const target = await createProcedure(builder, {
    title: `Bench head stud torque ${tag}`,
    area: "fasteners",
    summary: "Link target for the benchmark.",
    tags: ["bench"],
    doc: { type: "doc", content: [p("Head stud passes, planning figures only; the makers' published values take precedence.")] },
  });
  await publishNew(editor, builder, target.revision.id, "First version");

  const first = await createProcedure(builder, {
    title: `Bench torque-plate honing ${tag}`,
    area: "block",
    summary: "A long procedure with 40 revisions for the read-page benchmark.",
    tags: ["bench", "honing", "torque plate"],
    doc: benchDoc(target.procedure.id, rec.id, 0),
  });
  await publishNew(editor, builder, first.revision.id, "Revision 1");
  let published = first.revision.id;
  const t0 = performance.now();
  for (let n = 2; n <= 40; n++) {
    const draft = await startDraftFrom(builder, published);
    const doc = benchDoc(target.procedure.id, rec.id, n);
    const saved = await saveDraft(builder, draft.id, {
      baseVersion: draft.version,
      title: first.procedure.title,
      summary: first.procedure.summary,
      area: "block",
      tags: first.procedure.tags,
      doc,
    });
    if (!saved.ok) throw new Error("bench save conflicted");
    await publishNew(editor, builder, draft.id, `Revision ${n}: wording of stage ${n % 9}`);
    published = draft.id;
  }
  log(`set up 40 revisions in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  const finalDoc = benchDoc(target.procedure.id, rec.id, 40);
  const words = JSON.stringify(finalDoc)
    .match(/"text":"([^"]*)"/g)!
    .reduce((a, s) => a + s.slice(8, -1).split(/\s+/).filter(Boolean).length, 0);
  // The edit page needs an open draft: the 41st revision, left as a draft (not counted in the 40).
  const open = await startDraftFrom(builder, published);
  return { slug: first.procedure.slug, words, blocks: countBlocks(finalDoc), builder, apprentice, draftNumber: open.number };
}

// ---- measuring ---------------------------------------------------------------------------------

const base = () => {
  const u = new URL(process.env.BENCHREEL_URL ?? "");
  if (u.hostname !== "127.0.0.1" && u.hostname !== "localhost") throw new Error(`the benchmark only loads 127.0.0.1, not ${u.hostname}`);
  u.hostname = "127.0.0.1";
  return u.origin;
};

async function ttfbLoop(url: string, cookie: string, n: number): Promise<Stat & { queries: number[] }> {
  const times: number[] = [];
  const queries = new Set<number>();
  for (let i = 0; i < n + 10; i++) {
    const a = performance.now();
    const res = await fetch(url, { headers: { cookie, "accept-encoding": BROWSER_ENCODINGS }, redirect: "manual" });
    const headersAt = performance.now() - a; // fetch resolves when the status line and headers are in
    await res.arrayBuffer();
    if (res.status !== 200) throw new Error(`${url} answered ${res.status}`);
    const q = /\bdb;desc="(\d+) quer/.exec(res.headers.get("server-timing") ?? "");
    queries.add(q ? Number(q[1]) : 0);
    if (i >= 10) times.push(headersAt); // the first 10 warm up
  }
  return { ...stat(times), queries: [...queries].sort((x, y) => x - y) };
}

/** CPU time the app's process has used so far (ms); null when `npm run bench` did not name it. */
function appCpuMs(): number | null {
  const pid = process.env.BENCHREEL_APP_PID;
  return pid ? cpuMs(Number(pid)) : null;
}

/** What Debian's chromium sends: the server answers a page compressed, as a person's browser gets it. */
const BROWSER_ENCODINGS = "gzip, deflate, br, zstd";

/** 20 clients for 10 s; every response's latency (request written → response complete) is kept. */
async function cannon(url: string, cookie: string | string[]): Promise<{ result: autocannon.Result; times: number[] }> {
  const times: number[] = [];
  // One cookie for all 20 connections, or one person per connection.
  const cookies = Array.isArray(cookie) ? cookie : [cookie];
  let next = 0;
  const setupClient = (client: { setHeaders(h: Record<string, string>): void }) =>
    client.setHeaders({ cookie: cookies[next++ % cookies.length], "accept-encoding": BROWSER_ENCODINGS });
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const inst = autocannon(
      {
        url,
        connections: 20,
        duration: 10,
        headers: { cookie: cookies[0], "accept-encoding": BROWSER_ENCODINGS },
        setupClient,
        timeout: 20,
      },
      (err, r) => (err ? reject(err) : resolve(r)),
    );
    inst.on("response", (_client: unknown, _status: number, _bytes: number, responseTime: number) => times.push(responseTime));
  });
  return { result, times };
}

/** The read page's size, and the part of it that hands the loader data to the browser. */
async function pageSize(url: string, cookie: string) {
  const res = await fetch(url, { headers: { cookie, "accept-encoding": "identity" }, redirect: "manual" });
  const html = await res.text();
  const kB = (s: string) => +(Buffer.byteLength(s) / 1024).toFixed(1);
  const data = [...html.matchAll(/<script[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]).filter((x) => x.includes("__reactRouterContext"));
  // What a client-side navigation to the page fetches: the loader data alone.
  const nav = await (await fetch(`${url}.data`, { headers: { cookie, "accept-encoding": "identity" } })).text();
  return { htmlKB: kB(html), dataKB: kB(data.join("")), navigationKB: kB(nav) };
}

type JsReport = {
  files: number;
  rawBytes: number;
  gzipBytes: number;
  kB: number;
  lazyFiles: number;
  lazyGzipKB: number;
  largest: { file: string; gzipKB: number }[];
};

/** Every JS module the page loads before it is interactive, gzipped; lazy (import()) chunks apart. */
async function shippedJs(url: string, cookie: string): Promise<JsReport> {
  const res = await fetch(url, { headers: { cookie }, redirect: "manual" });
  if (res.status !== 200) throw new Error(`${url} answered ${res.status}`);
  const html = await res.text();
  const origin = new URL(url).origin;
  const eager = new Set<string>();
  for (const m of html.matchAll(/<link[^>]+rel="modulepreload"[^>]*>/g)) {
    const href = /href="([^"]+)"/.exec(m[0])?.[1];
    if (href) eager.add(new URL(href, origin).pathname);
  }
  for (const m of html.matchAll(/<script[^>]+src="([^"]+)"/g)) eager.add(new URL(m[1], origin).pathname);
  for (const m of html.matchAll(/import\s*(?:\(\s*)?["'](\/[^"']+\.js)["']/g)) eager.add(m[1]); // inline module scripts
  const body = new Map<string, string>();
  const lazy = new Set<string>();
  const queue = [...eager];
  while (queue.length) {
    const file = queue.shift()!;
    if (body.has(file)) continue;
    const r = await fetch(origin + file);
    if (r.status !== 200) throw new Error(`${file} answered ${r.status}`);
    const src = await r.text();
    body.set(file, src);
    const dir = file.slice(0, file.lastIndexOf("/") + 1);
    const resolve = (spec: string) => new URL(spec, origin + dir).pathname;
    // Static imports (import … from "x", import "x", export … from "x") belong to the page.
    for (const m of src.matchAll(/(?:import|export)\s*(?:[\w*{}\s,$]+from\s*)?["'`]([^"'`]+\.js)["'`]/g)) {
      const f = resolve(m[1]);
      if (!eager.has(f)) {
        eager.add(f);
        queue.push(f);
      }
    }
    for (const m of src.matchAll(/import\(\s*["'`]([^"'`]+\.js)["'`]\s*\)/g)) lazy.add(resolve(m[1]));
  }
  for (const f of eager) lazy.delete(f);
  let raw = 0;
  let gz = 0;
  const sizes: { file: string; gzipKB: number }[] = [];
  for (const [file, src] of body) {
    const g = gzipSync(Buffer.from(src), { level: 9 }).length;
    raw += Buffer.byteLength(src);
    gz += g;
    sizes.push({ file, gzipKB: +(g / 1024).toFixed(1) });
  }
  let lazyGz = 0;
  for (const f of lazy) {
    const r = await fetch(origin + f);
    if (r.status === 200) lazyGz += gzipSync(Buffer.from(await r.text()), { level: 9 }).length;
  }
  sizes.sort((a, b) => b.gzipKB - a.gzipKB);
  return {
    files: body.size,
    rawBytes: raw,
    gzipBytes: gz,
    kB: +(gz / 1024).toFixed(1),
    lazyFiles: lazy.size,
    lazyGzipKB: +(lazyGz / 1024).toFixed(1),
    largest: sizes.slice(0, 6),
  };
}

export async function benchProcedures(opts: { log?: (s: string) => void } = {}) {
  const log = opts.log ?? console.log;
  const s = await setUpBenchProcedure(log);
  log(`procedure ${s.slug}: ${s.words} words, ${s.blocks} embedded blocks, 40 revisions (+1 open draft)`);
  const origin = base();
  const readUrl = `${origin}/procedures/${s.slug}`;
  const editUrl = `${origin}/procedures/${s.slug}/r/${s.draftNumber}/edit`;

  const size = await pageSize(readUrl, s.apprentice.cookie);
  log(
    `read page: ${size.htmlKB} kB of HTML, of which ${size.dataKB} kB are the inline scripts carrying the loader data to the browser; a navigation's loader data ${size.navigationKB} kB`,
  );
  const seq = await ttfbLoop(readUrl, s.apprentice.cookie, 200);
  log(
    `read page TTFB, one client: p50 ${seq.p50} ms, p95 ${seq.p95} ms (${seq.samples} requests); database queries per render: ${seq.queries.join(", ")}`,
  );
  await cannon(readUrl, s.apprentice.cookie); // warm-up round, discarded
  const load0 = os.loadavg()[0];
  const cpu0 = appCpuMs();
  const { result: c, times } = await cannon(readUrl, s.apprentice.cookie);
  const cpu1 = appCpuMs();
  const load1 = os.loadavg()[0];
  if (c.non2xx) throw new Error(`autocannon saw ${c.non2xx} non-2xx answers`);
  const sorted = [...times].sort((x, y) => x - y);
  const q = (f: number) => +sorted[Math.min(sorted.length - 1, Math.floor(f * sorted.length))].toFixed(2);
  const concurrent = {
    p50: q(0.5),
    p95: q(0.95),
    p99: q(0.99),
    autocannon: { p50: c.latency.p50, p97_5: c.latency.p97_5, p99: c.latency.p99, mean: +c.latency.mean.toFixed(2) },
    requestsPerSec: +c.requests.average.toFixed(1),
    requests: c.requests.total,
    errors: c.errors,
    timeouts: c.timeouts,
    loadAverage: [+load0.toFixed(2), +load1.toFixed(2)],
    /** The app process's CPU per response at 20 clients; × 20 is the least a one-process p95 can be. */
    cpuMsPerResponse: cpu0 == null || cpu1 == null ? null : +((cpu1 - cpu0) / c.requests.total).toFixed(2),
  };
  const p95 = concurrent.p95;
  log(
    `read page, 20 clients (autocannon, per response): p50 ${concurrent.p50} ms, p95 ${p95} ms, p99 ${concurrent.p99} ms, ${concurrent.requestsPerSec} req/s; load average ${load0.toFixed(1)} → ${load1.toFixed(1)}${concurrent.cpuMsPerResponse == null ? "" : `; the app's CPU ${concurrent.cpuMsPerResponse} ms a response`}`,
  );

  // The floor of this stack: the same load on a light page (the calculators index, no procedure data).
  const bCpu0 = appCpuMs();
  const { result: b, times: bt } = await cannon(`${origin}/calculators`, s.apprentice.cookie);
  const bCpu1 = appCpuMs();
  const bs = [...bt].sort((x, y) => x - y);
  const bq = (f: number) => +bs[Math.min(bs.length - 1, Math.floor(f * bs.length))].toFixed(2);
  const baseline = {
    path: "/calculators",
    p50: bq(0.5),
    p95: bq(0.95),
    p99: bq(0.99),
    requestsPerSec: +b.requests.average.toFixed(1),
    non2xx: b.non2xx,
    cpuMsPerResponse: bCpu0 == null || bCpu1 == null ? null : +((bCpu1 - bCpu0) / b.requests.total).toFixed(2),
  };
  log(
    `baseline /calculators, 20 clients: p50 ${baseline.p50} ms, p95 ${baseline.p95} ms, ${baseline.requestsPerSec} req/s${baseline.cpuMsPerResponse == null ? "" : `; the app's CPU ${baseline.cpuMsPerResponse} ms a response`}`,
  );

  const readJs = await shippedJs(readUrl, s.apprentice.cookie);
  const editJs = await shippedJs(editUrl, s.builder.cookie);
  log(`JS gzipped: read ${readJs.kB} kB in ${readJs.files} files; edit ${editJs.kB} kB in ${editJs.files} files`);

  const mostQueries = Math.max(...seq.queries);
  return {
    words: s.words,
    embeddedBlocks: s.blocks,
    revisions: 40,
    pageSize: size,
    ttfbSequential: seq,
    ttfb20Clients: concurrent,
    baseline20Clients: baseline,
    readToBaselineP95: +(p95 / Math.max(baseline.p95, 0.01)).toFixed(2),
    readJs,
    editJs,
    editToReadJsRatio: +(editJs.gzipBytes / readJs.gzipBytes).toFixed(2),
    concurrentToSequentialP50: +(concurrent.p50 / Math.max(seq.p50, 0.01)).toFixed(2),
    targets: {
      "read page TTFB p50 ≤ 15 ms (one client)": { value: seq.p50, ok: seq.p50 <= 15 },
      "read page TTFB p95 ≤ 150 ms (20 clients, every response rendered)": { value: p95, ok: p95 <= 150 },
      "database queries per render ≤ 6": { value: mostQueries, ok: mostQueries <= 6 },
      "read page JS ≤ 150 kB gzipped": { value: readJs.kB, ok: readJs.kB <= 150 },
    },
  };
}
