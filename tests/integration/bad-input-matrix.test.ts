// The bad-input matrix: every route of app/routes.ts and every method its module answers gets
// malformed ids, NUL bytes, out-of-range numbers, wrong content types, broken and oversized
// bodies, as a hostile or clumsy client would send them; no answer may be a 5xx. Routes, their
// params, methods, query names and form fields are read from the route config and the route
// modules' source, so a new route is covered without anyone adding it here.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import nodeHttp from "node:http";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { builds, captionCues, marks, procedureRevisions, procedures, procedureSpecs, readings, recordings, testRecords } from "~/db/schema";
import { clearanceDefaults } from "~/lib/calc-ui/clearance-form";
import { distortionDefaults } from "~/lib/calc-ui/distortion-form";
import { preloadDefaults } from "~/lib/calc-ui/preload-form";
import { db } from "~/lib/db.server";
import { bodyLimitFor } from "~/lib/edge-limits";
import { BASE_URL, createUser, http, sessionCookieFor, type TestUser } from "../support/app";
import { configuredRoutes } from "../support/routes";

const APP = path.resolve(import.meta.dirname, "../../app");
const source = (file: string) => fs.readFileSync(path.join(APP, file), "utf8");

/** The methods a module answers: GET with a loader; POST, and any verb it names, with an action. */
function methodsOf(src: string): string[] {
  const out: string[] = [];
  if (/export (async )?function loader|export const loader/.test(src)) out.push("GET");
  if (/export (async )?function action|export const action/.test(src)) {
    out.push("POST");
    for (const m of ["PUT", "PATCH", "DELETE"]) if (src.includes(`"${m}"`)) out.push(m);
  }
  return out;
}

const uniq = <T>(xs: T[]) => [...new Set(xs)];
const all = (re: RegExp, s: string) => [...s.matchAll(re)].map((m) => m[1]);

/** Query names every route is tried with, and those its module reads. */
const COMMON_QUERY = [
  "q",
  "page",
  "limit",
  "rev",
  "from",
  "to",
  "v",
  "tag",
  "sort",
  "type",
  "state",
  "uploader",
  "format",
  "next",
  "procedure",
  "recording",
  "except",
  "t",
];
const queryNamesOf = (src: string) =>
  uniq([...all(/searchParams\.get\("([\w.-]+)"\)/g, src), ...all(/\bu\.searchParams\.get\("([\w.-]+)"\)/g, src)]);

/** Form fields: those the module names (inputs, form.get, schema keys) and the shop's common ones. */
const COMMON_FIELDS = [
  "title",
  "text",
  "name",
  "email",
  "password",
  "next",
  "notes",
  "workOrder",
  "engineSerial",
  "testedOn",
  "revisionId",
  "recordingId",
  "reason",
  "summary",
  "area",
  "tags",
  "words",
  "role",
  "active",
  "userId",
  "changeNote",
  "value",
  "unit",
  "label",
];
const fieldsOf = (src: string) =>
  uniq([...all(/name="([\w.-]+)"/g, src), ...all(/form\.get\("([\w.-]+)"\)/g, src), ...all(/^\s+(\w+): z\./gm, src), ...COMMON_FIELDS]);
const intentsOf = (src: string) => uniq([...all(/intent === "([\w-]+)"/g, src), ...all(/case "([\w-]+)":/g, src), "__none__"]);

const BAD_PARAMS = [
  "not-a-uuid",
  "%00",
  "a%00b",
  "99999999999999999999",
  "2147483648",
  "-1",
  "0",
  "1.5",
  "1e308",
  "00000000-0000-0000-0000-00000000000g",
  "x".repeat(2000),
  "%E2%80%AE%F0%9F%94%A7",
];
const BAD_VALUES = [
  "a\u0000b",
  "\u0000",
  "99999999999999999999",
  "1e308",
  "-1e308",
  "NaN",
  "Infinity",
  "2024-02-30",
  "0000-01-01",
  "x".repeat(20_000),
];
const JSON_BODIES = ["null", "true", "1", '"str"', "[]", "{}", '{"a":', "[[[[[[[[[[", '{"__proto__":{"x":1}}'];

/** A procedure with revision 1 published and one bore spec, made directly. */
async function publishedProcedure(prefix: string) {
  const tag = randomUUID().slice(0, 8);
  const [p] = await db()
    .insert(procedures)
    .values({ slug: `${prefix}-${tag}`, title: `Bad input check ${tag}`, area: "block" })
    .returning();
  const [rev] = await db()
    .insert(procedureRevisions)
    .values({ procedureId: p.id, number: 1, state: "published", title: p.title, area: "block", doc: DOC, publishedAt: new Date() })
    .returning();
  const [spec] = await db()
    .insert(procedureSpecs)
    .values({
      revisionId: rev.id,
      procedureId: p.id,
      specKey: "bore",
      position: 0,
      label: "Bore",
      quantity: "length",
      unit: "mm",
      nominal: 88,
      min: 87.9,
      max: 88.1,
      siUnit: "m",
      minSi: 0.0879,
      maxSi: 0.0881,
    })
    .returning();
  await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, p.id));
  return { procedure: p, rev, spec };
}

const DOC = { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Measure." }] }] };

type Tried = { route: string; method: string; what: string; status: number };

describe("bad-input matrix", () => {
  const configured = configuredRoutes();
  const tried: Tried[] = [];
  let admin: TestUser;
  const good: Record<string, string> = {};

  beforeAll(async () => {
    admin = await createUser("admin");
    const { procedure: p, rev, spec } = await publishedProcedure("bad-input");
    const [draft] = await db()
      .insert(procedureRevisions)
      .values({ procedureId: p.id, number: 2, state: "draft", title: p.title, area: "block", doc: DOC, authorId: admin.id })
      .returning();
    const [rec] = await db()
      .insert(recordings)
      .values({ title: `Bad input ${p.slug}`, originalName: "b.mp4", originalSize: 1, state: "ready", durationS: 60, uploadedBy: admin.id })
      .returning();
    const [mark] = await db().insert(marks).values({ recordingId: rec.id, tStart: 3, text: "A mark", createdBy: admin.id }).returning();
    const [reading] = await db()
      .insert(readings)
      .values({ recordingId: rec.id, quantity: "torque", valueSi: 110, valueEntered: 110, unitEntered: "N.m", t: 3, createdBy: admin.id })
      .returning();
    const [cue] = await db()
      .insert(captionCues)
      .values({ recordingId: rec.id, position: 1, startS: 1, endS: 2.5, text: "A caption line" })
      .returning();
    // A test record is filed for a build (issue 16): this matrix's own, so its posts change no demo build.
    await db().insert(builds).values({ number: "BADIN-24-0001", customerName: "Bad input matrix" }).onConflictDoNothing();
    const filed = await http(`/test-records/new?procedure=${p.slug}`, {
      cookie: admin.cookie,
      form: {
        revisionId: rev.id,
        title: "Bore check",
        workOrder: "BADIN-24-0001",
        engineSerial: "X1",
        testedOn: new Date().toISOString().slice(0, 10),
        [`r.${spec.id}.0.value`]: "88",
        [`r.${spec.id}.0.unit`]: "mm",
      },
    });
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(filed.headers.get("location") ?? "")?.[1];
    if (!recordId) throw new Error(`could not file the fixture test record (${filed.status})`);
    Object.assign(good, {
      slug: p.slug,
      number: "2",
      build: "BADIN-24-0001",
      revision: draft.id,
      recording: rec.id,
      mark: mark.id,
      reading: reading.id,
      cue: cue.id,
      record: recordId,
      spec: spec.id,
      published: rev.id,
    });
  });

  afterAll(() => {
    const errors = tried.filter((t) => t.status >= 500);
    console.log(`bad-input matrix: ${configured.length} routes, ${tried.length} bad requests, ${errors.length} answered 5xx`);
    if (process.env.BAD_INPUT_LOG) fs.writeFileSync(process.env.BAD_INPUT_LOG, JSON.stringify(tried));
  });

  /** The path with good values for every param, except `bad` for the one named. */
  function fill(pattern: string, badParam?: string, bad?: string): string {
    return (
      pattern
        .replace(/:(\w+)|\*/g, (_whole, name: string | undefined) => {
          const key = name ?? "*";
          if (key === badParam) return bad!;
          if (key === "*") return "";
          if (name === "slug") return good.slug;
          if (name === "number" && /^\/(api\/)?builds\//.test(pattern)) return good.build;
          if (name === "number") return good.number;
          if (name === "token") return "not-a-real-token";
          if (name === "markId") return good.mark;
          if (name === "readingId") return good.reading;
          if (name === "cueId") return good.cue;
          if (pattern.startsWith("/api/procedures/revisions")) return good.revision;
          if (pattern.includes("recordings/")) return good.recording;
          if (pattern.includes("test-records/")) return good.record;
          return randomUUID();
        })
        .replace(/\/$/, "") || "/"
    );
  }

  /** A fresh admin session per route: a route may sign the person out (POST /signout). */
  const cookieFor = async (route: string) =>
    route === "/signin" || route.startsWith("/reset") || route.startsWith("/invite") ? undefined : sessionCookieFor(admin.email);

  async function send(
    route: string,
    method: string,
    what: string,
    url: string,
    init: { cookie?: string; body?: BodyInit; type?: string | null } = {},
  ) {
    const headers: Record<string, string> = {};
    if (init.type) headers["content-type"] = init.type;
    const res = await http(url, { method, cookie: init.cookie, body: init.body, headers });
    await res.body?.cancel();
    tried.push({ route, method, what, status: res.status });
    return res.status;
  }

  /** A request with a declared or a chunked body past the route's limit, over a raw socket. */
  function oversized(url: string, cookie: string | undefined, how: "declared" | "chunked", bytes: number): Promise<number> {
    return new Promise((resolve, reject) => {
      const u = new URL(url, BASE_URL);
      const headers: Record<string, string | number> = {
        origin: BASE_URL,
        "content-type": "application/x-www-form-urlencoded",
        ...(cookie ? { cookie } : {}),
      };
      if (how === "declared") headers["content-length"] = bytes;
      else headers["transfer-encoding"] = "chunked";
      const req = nodeHttp.request(u, { method: "POST", headers }, (res) => {
        res.resume();
        resolve(res.statusCode ?? 0);
      });
      req.on("error", reject);
      if (how === "declared") {
        req.write("a=".padEnd(1024, "b"));
        return; // the rest never comes: the answer must not wait for it
      }
      const chunk = Buffer.alloc(64 * 1024, "a");
      let sent = 0;
      const pump = () => {
        while (sent < bytes) {
          sent += chunk.length;
          if (!req.write(chunk)) return void req.once("drain", pump);
        }
        req.end();
      };
      req.on("response", () => req.destroy());
      pump();
    });
  }

  for (const { path: route, file } of configured) {
    it(`${route}: no 5xx for any bad input`, { timeout: 240_000 }, async () => {
      const src = source(file);
      const methods = methodsOf(src);
      const cookie = await cookieFor(route);
      const params = all(/:(\w+)/g, route).concat(route.includes("*") ? ["*"] : []);
      const base = fill(route);

      // malformed params, every method
      for (const p of params) {
        for (const bad of BAD_PARAMS) {
          const url = fill(route, p, bad);
          for (const m of methods)
            await send(route, m, `param ${p}=${bad.slice(0, 20)}`, url, {
              cookie,
              ...(m === "GET" ? {} : { body: new URLSearchParams({ a: "1" }), type: "application/x-www-form-urlencoded" }),
            });
        }
      }

      if (methods.includes("GET")) {
        const names = uniq([...queryNamesOf(src), "q", "page"]);
        for (const n of names)
          for (const v of BAD_VALUES)
            await send(route, "GET", `?${n}=${v.slice(0, 12)}`, `${base}?${new URLSearchParams({ [n]: v })}`, { cookie });
        for (const v of BAD_VALUES)
          await send(route, "GET", `?all=${v.slice(0, 12)}`, `${base}?${new URLSearchParams(COMMON_QUERY.map((n) => [n, v]))}`, { cookie });
        await send(route, "GET", "broken percent-encoding", `${base}?q=%E0%A4%A&next=%`, { cookie });
      }

      const bodyMethods = methods.filter((m) => m !== "GET" && m !== "DELETE");
      const fields = fieldsOf(src);
      for (const m of bodyMethods) {
        // wrong and missing content types, broken bodies
        await send(route, m, "no content-type", base, { cookie, body: new TextEncoder().encode("title=x&name=y") });
        await send(route, m, "text/plain", base, { cookie, body: "title=x", type: "text/plain" });
        await send(route, m, "multipart without boundary", base, { cookie, body: "--x\r\n", type: "multipart/form-data" });
        await send(route, m, "broken multipart", base, {
          cookie,
          body: '--XYZ\r\nContent-Disposition: form-data; name="title"\r\n\r\nabc',
          type: "multipart/form-data; boundary=XYZ",
        });
        await send(route, m, "not UTF-8", base, {
          cookie,
          body: new Uint8Array([0x74, 0x3d, 0xff, 0xfe, 0xc3]),
          type: "application/x-www-form-urlencoded",
        });
        for (const j of JSON_BODIES) await send(route, m, `json ${j}`, base, { cookie, body: j, type: "application/json" });
        for (const v of ["a\u0000b", 1e308, -1e308, 2147483648, 1e20, "2024-02-30", "0000-01-01"]) {
          const body = Object.fromEntries(fields.map((f) => [f, v]));
          await send(route, m, `json fields=${String(v).slice(0, 12)}`, base, {
            cookie,
            body: JSON.stringify(body),
            type: "application/json",
          });
        }
        await send(route, m, "json value 1e309", base, {
          cookie,
          body: '{"value":1e309,"quantity":"clamp-load","unit":"lbf","tStart":1e309,"baseVersion":1e309}',
          type: "application/json",
        });
        // forms: every intent the module knows, every field bad at once
        for (const intent of intentsOf(src)) {
          for (const v of BAD_VALUES) {
            const form = new URLSearchParams(fields.map((f) => [f, v]));
            if (intent !== "__none__") form.set("intent", intent);
            await send(route, m, `form ${intent} fields=${v.slice(0, 12)}`, base, {
              cookie,
              body: form,
              type: "application/x-www-form-urlencoded",
            });
          }
        }
        await send(route, m, "multipart with a NUL field", base, {
          cookie,
          body: (() => {
            const f = new FormData();
            for (const n of fields) f.set(n, "a\u0000b");
            return f;
          })(),
        });
      }

      // bodies past the route's limit: refused with 413 (tus routes apply their own limit)
      if (methods.includes("POST")) {
        const limit = bodyLimitFor(base).bytes;
        if (limit != null) {
          const declared = await oversized(base, cookie, "declared", 200 * 1024 * 1024);
          tried.push({ route, method: "POST", what: "declared 200 MB", status: declared });
          expect(declared, `${route}: a declared 200 MB body`).toBe(413);
          const chunked = await oversized(base, cookie, "chunked", limit + 128 * 1024);
          tried.push({ route, method: "POST", what: "chunked past the limit", status: chunked });
          expect(chunked, `${route}: a chunked body past ${limit} bytes`).toBeLessThan(500);
        }
      }

      const errors = tried.filter((t) => t.route === route && t.status >= 500);
      expect(errors.map((e) => `${e.method} ${e.what} → ${e.status}`)).toEqual([]);
    });
  }
});

describe("the cases the outside testers found", () => {
  let qc: TestUser;
  let recordingId: string;
  let readingId: string;
  let slug: string;
  let revisionId: string;
  let specId: string;
  beforeAll(async () => {
    qc = await createUser("qc");
    const tag = randomUUID().slice(0, 8);
    const [rec] = await db()
      .insert(recordings)
      .values({ title: `Edge ${tag}`, originalName: "e.mp4", originalSize: 1, state: "ready", durationS: 60, uploadedBy: qc.id })
      .returning();
    recordingId = rec.id;
    const [r] = await db()
      .insert(readings)
      .values({ recordingId, quantity: "torque", valueSi: 110, valueEntered: 110, unitEntered: "N.m", t: 3, createdBy: qc.id })
      .returning();
    readingId = r.id;
    const { procedure: p, rev, spec } = await publishedProcedure("edge");
    slug = p.slug;
    revisionId = rev.id;
    specId = spec.id;
  });

  it("a NUL in a query parameter or a mark's text is a 4xx with a reason", async () => {
    const q = await http("/api/recordings?q=%00", { cookie: qc.cookie });
    expect(q.status).toBe(422);
    expect(((await q.json()) as { issues: { path: string }[] }).issues[0].path).toBe("q");
    const mark = await http(`/api/recordings/${recordingId}/marks`, { cookie: qc.cookie, json: { tStart: 1, text: "a\u0000b" } });
    expect(mark.status).toBe(422);
    expect(((await mark.json()) as { issues: { path: string }[] }).issues[0].path).toBe("text");
    const page = await http("/procedures?tag=%00", { cookie: qc.cookie });
    expect(page.status).toBe(400);
    // GET /api/search is answered by server.js without the root middleware; HEAD goes through it.
    for (const method of ["GET", "HEAD"]) expect((await http("/api/search?q=%00", { method, cookie: qc.cookie })).status, method).toBe(422);
  });

  it("a build number that is not one (NUL, too long, a number, an unknown one) is a 4xx where recordings and marks take it", async () => {
    const bad: unknown[] = ["LEW-24-\u00000117", `LEW-24-${"9".repeat(5000)}`, 117, { number: "LEW-24-0117" }, "ZZ-99-99995"];
    for (const buildNumber of bad) {
      const what = JSON.stringify(buildNumber).slice(0, 40);
      const mark = await http(`/api/recordings/${recordingId}/marks`, {
        cookie: qc.cookie,
        json: { tStart: 1, text: "a mark", buildNumber },
      });
      expect(mark.status, `mark ${what}`).toBe(422);
      expect(((await mark.json()) as { issues: { path: string }[] }).issues[0].path, `mark ${what}`).toBe("buildNumber");
      const rec = await http(`/api/recordings/${recordingId}`, { method: "PATCH", cookie: qc.cookie, json: { buildNumber } });
      expect(rec.status, `recording ${what}`).toBeGreaterThanOrEqual(400);
      expect(rec.status, `recording ${what}`).toBeLessThan(500);
    }
    const page = await http("/builds/LEW-24-0117", { cookie: qc.cookie, form: { intent: "attach-recording", recordingId: "x\u0000" } });
    expect(page.status).toBe(400);
  });

  it("ids that are not UUIDs are a 404 on pages and the API", async () => {
    const admin = await createUser("admin");
    for (const url of [
      "/recordings/1",
      "/test-records/abc",
      "/test-records/abc/amend",
      "/test-records/abc/print",
      "/api/recordings/abc",
      "/api/recordings/abc/marks",
      "/api/recordings/abc/readings",
      `/api/recordings/${recordingId}/readings/abc`,
      "/api/procedures/revisions/abc",
      "/api/procedures/revisions/------------------------------------",
      "/test-records/------------------------------------",
    ]) {
      const res = await http(url, { cookie: admin.cookie });
      expect(res.status, url).toBe(404);
    }
  });

  it("revision numbers past PostgreSQL's integer are a 404", async () => {
    for (const url of [
      `/procedures/${slug}/r/99999999999999999999`,
      `/procedures/${slug}/r/2147483648`,
      `/procedures/${slug}/r/2147483648/edit`,
      `/procedures/${slug}/print?rev=2147483648`,
      `/procedures/${slug}/compare?from=2147483648&to=1`,
      `/procedures/${slug}/compare?from=1&to=99999999999999999999`,
    ]) {
      const res = await http(url, { cookie: (await createUser("editor")).cookie });
      expect(res.status, url).toBe(404);
    }
    const editor = await createUser("editor");
    const save = await http(`/api/procedures/revisions/${revisionId}`, {
      cookie: editor.cookie,
      json: { baseVersion: 2147483648, title: "Edge check", area: "block", doc: {} },
    });
    expect(save.status).toBe(422);
  });

  it("a spec with a nominal of 1e308, or a NUL in the document, is not saved", async () => {
    const editor = await createUser("editor");
    const [p] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    const [draft] = await db()
      .insert(procedureRevisions)
      .values({ procedureId: p.procedureId, number: 2, state: "draft", title: p.title, area: "block", doc: DOC, authorId: editor.id })
      .returning();
    const spec = {
      type: "spec",
      attrs: { id: "s1", label: "Torque", quantity: "torque", unit: "N.m", nominal: 1e308, min: null, max: null, note: "" },
    };
    const save = (doc: unknown) =>
      http(`/api/procedures/revisions/${draft.id}`, {
        cookie: editor.cookie,
        json: { baseVersion: draft.version, title: p.title, area: "block", doc },
      });
    const huge = await save({ type: "doc", content: [spec] });
    expect(huge.status).toBe(422);
    expect(JSON.stringify(await huge.json())).toMatch(/nominal/);
    const nul = await save({ type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "a\u0000b" }] }] });
    expect(nul.status).toBe(422);
    const [after] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, draft.id));
    expect(after.version).toBe(draft.version);
  });

  it("impossible dates and an unknown source reading in a test record are field errors", async () => {
    const base = {
      revisionId,
      title: "Bore check",
      workOrder: "BADIN-24-0001",
      engineSerial: "X1",
      [`r.${specId}.0.value`]: "88",
      [`r.${specId}.0.unit`]: "mm",
    };
    for (const testedOn of ["2024-02-30", "0000-01-01", "2023-13-01"]) {
      const res = await http(`/test-records/new?procedure=${slug}`, { cookie: qc.cookie, form: { ...base, testedOn } });
      expect(res.status, testedOn).toBe(400);
    }
    const res = await http(`/test-records/new?procedure=${slug}`, {
      cookie: qc.cookie,
      form: { ...base, testedOn: "2024-02-29", [`r.${specId}.0.src`]: randomUUID() },
    });
    expect(res.status).toBe(400);
    expect(await res.text()).toContain("That recording reading does not exist");
  });

  it("form POSTs with no Content-Type, broken multipart or JSON are 4xx, the public sign-in and reset included", async () => {
    for (const url of ["/signin", "/reset", "/test-records/new", "/account"]) {
      const cookie = url === "/signin" || url === "/reset" ? undefined : qc.cookie;
      const none = await http(url, { method: "POST", cookie, body: new TextEncoder().encode("email=a@b.c") });
      expect(none.status, `${url} no content-type`).toBe(415);
      const json = await http(url, { method: "POST", cookie, json: { email: "a@b.c" } });
      expect(json.status, `${url} JSON`).toBe(415);
      const broken = await http(url, {
        method: "POST",
        cookie,
        body: "--XYZ\r\nbroken",
        headers: { "content-type": "multipart/form-data; boundary=XYZ" },
      });
      expect(broken.status, `${url} broken multipart`).toBe(400);
    }
  });

  it("a reading PATCH whose body is not an object is a 422 and changes nothing", async () => {
    for (const body of ["null", "true", "1", '"str"', "[]"]) {
      const res = await http(`/api/recordings/${recordingId}/readings/${readingId}`, {
        method: "PATCH",
        cookie: qc.cookie,
        body,
        headers: { "content-type": "application/json" },
      });
      expect(res.status, body).toBe(422);
    }
  });

  it("a value past what a gauge can read is refused, never stored as Infinity", async () => {
    for (const value of [1e308, 1e12, -5e7]) {
      const res = await http(`/api/recordings/${recordingId}/readings`, {
        cookie: qc.cookie,
        json: { quantity: "clamp-load", value, unit: "lbf" },
      });
      expect(res.status, String(value)).toBe(422);
      expect(((await res.json()) as { issues: { path: string }[] }).issues[0].path).toBe("value");
    }
    const ok = await http(`/api/recordings/${recordingId}/readings`, {
      cookie: qc.cookie,
      json: { quantity: "clamp-load", value: 12000, unit: "lbf" },
    });
    expect(ok.status).toBe(201);
    const res = await http(`/test-records/new?procedure=${slug}`, {
      cookie: qc.cookie,
      form: {
        revisionId,
        title: "Bore check",
        workOrder: "BADIN-24-0001",
        testedOn: "2024-02-29",
        [`r.${specId}.0.value`]: "1e308",
        [`r.${specId}.0.unit`]: "mm",
      },
    });
    expect(res.status).toBe(400);
    const stored = await db()
      .select()
      .from(testRecords)
      .where(and(eq(testRecords.revisionId, revisionId), eq(testRecords.title, "Bore check")));
    expect(stored).toEqual([]);
  });

  it("a calculator form that computes, with display units that are no unit codes, still renders", async () => {
    for (const [path, defaults] of [
      ["/calculators/preload", preloadDefaults],
      ["/calculators/distortion", distortionDefaults],
      ["/calculators/clearance", clearanceDefaults],
    ] as const) {
      const form = defaults("metric");
      for (const k of ["out.force", "out.torque", "out.stress", "out.length", "out.small"]) form[k] = "furlong";
      const res = await http(path, { cookie: qc.cookie, form: form as Record<string, string> });
      expect(res.status, path).toBe(200);
      await res.body?.cancel();
    }
  });

  it("a declared body past a route's limit is a 413 with the reason, before the body is read", async () => {
    const res = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = nodeHttp.request(
        new URL("/reset", BASE_URL),
        {
          method: "POST",
          headers: { origin: BASE_URL, "content-type": "application/x-www-form-urlencoded", "content-length": 200 * 1024 * 1024 },
        },
        (r) => {
          let body = "";
          r.on("data", (c) => (body += c));
          r.on("end", () => resolve({ status: r.statusCode ?? 0, body }));
        },
      );
      req.on("error", reject);
      req.write("email=");
    });
    expect(res.status).toBe(413);
    expect(res.body).toContain("larger than this address takes");
  });
});
