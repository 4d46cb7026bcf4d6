// Walks every route of app/routes.ts with every role and anonymous, and asserts the status
// each must get. A route without an entry here fails the first test.
import { describe, expect, it, beforeAll } from "vitest";
import { ROLES, type Role } from "~/lib/permissions";
import { createUser, http } from "../support/app";
import { configuredRoutes } from "../support/routes";

type Who = Role | "anon";
type Expect = Record<Who, number>;

const ALL = (status: number): Expect => ({ anon: status, admin: status, editor: status, builder: status, qc: status, apprentice: status });
/** Signed-in page every role may open; anonymous goes to sign-in. */
const SIGNED_IN = { ...ALL(200), anon: 302 };
/** Signed-in API every role may use; anonymous gets 401. */
const SIGNED_IN_API = { ...ALL(200), anon: 401 };
const only = (roles: Role[], ok = 200, anon = 302): Expect =>
  ({ anon, ...Object.fromEntries(ROLES.map((r) => [r, roles.includes(r) ? ok : 403])) }) as Expect;
const STAFF: Role[] = ["admin", "editor", "builder", "qc"];

type Entry = { path: string; sample?: string; get: Expect; post?: Expect; note?: string };

const MATRIX: Entry[] = [
  // ---- public ----
  { path: "/signin", get: { ...ALL(302), anon: 200 }, note: "signed-in people are sent on" },
  { path: "/signout", get: ALL(302) },
  { path: "/invite/:token", sample: "/invite/not-a-real-token", get: ALL(200), note: "shows 'not valid'" },
  { path: "/reset", get: ALL(200) },
  { path: "/reset/:token", sample: "/reset/not-a-real-token", get: ALL(200) },
  { path: "/healthz", get: ALL(200) },

  // ---- shell ----
  { path: "/", get: SIGNED_IN },
  { path: "/account", get: SIGNED_IN },
  { path: "/procedures", get: SIGNED_IN },
  { path: "/procedures/new", get: only(["admin", "editor", "builder"]), post: only(["admin", "editor", "builder"], 400) },
  { path: "/procedures/:slug", sample: "/procedures/no-such-procedure", get: { ...ALL(404), anon: 302 } },
  { path: "/procedures/:slug/history", sample: "/procedures/no-such-procedure/history", get: { ...ALL(404), anon: 302 } },
  { path: "/procedures/:slug/compare", sample: "/procedures/no-such-procedure/compare", get: { ...ALL(404), anon: 302 } },
  { path: "/procedures/:slug/print", sample: "/procedures/no-such-procedure/print", get: { ...ALL(404), anon: 302 } },
  { path: "/procedures/:slug/r/:number", sample: "/procedures/no-such-procedure/r/1", get: { ...ALL(404), anon: 302 } },
  {
    path: "/procedures/:slug/r/:number/edit",
    sample: "/procedures/no-such-procedure/r/1/edit",
    get: only(["admin", "editor", "builder"], 404),
  },
  { path: "/recordings", get: SIGNED_IN },
  // recordings
  { path: "/recordings/upload", get: only(STAFF) },
  {
    path: "/recordings/:id",
    sample: "/recordings/00000000-0000-4000-8000-000000000000",
    get: { ...ALL(404), anon: 302 },
    post: { ...only(STAFF, 404), apprentice: 403 },
    note: "unknown id: guard first, then 404",
  },
  // builds (LEW-24-0117 is a demo build)
  { path: "/builds", get: SIGNED_IN },
  { path: "/builds/new", get: only(STAFF), post: only(STAFF, 400) },
  { path: "/builds/:number", sample: "/builds/LEW-24-0117", get: SIGNED_IN, post: only(STAFF, 400), note: "an empty form names no action" },
  { path: "/builds/:number/edit", sample: "/builds/LEW-24-0117/edit", get: only(STAFF), post: only(STAFF, 400) },
  { path: "/builds/:number/sheet", sample: "/builds/LEW-24-0117/sheet", get: SIGNED_IN },
  { path: "/builds/:number/sheet.pdf", sample: "/builds/LEW-24-0117/sheet.pdf", get: SIGNED_IN },
  { path: "/builds/:number/readings.csv", sample: "/builds/LEW-24-0117/readings.csv", get: SIGNED_IN },
  { path: "/test-records", get: SIGNED_IN },
  { path: "/test-records/new", get: only(STAFF), post: only(STAFF, 400) },
  { path: "/test-records/export.csv", get: SIGNED_IN },
  {
    path: "/test-records/:id",
    sample: "/test-records/00000000-0000-4000-8000-000000000000",
    get: { ...ALL(404), anon: 302 },
    post: only(STAFF, 404),
    note: "unknown id",
  },
  {
    path: "/test-records/:id/amend",
    sample: "/test-records/00000000-0000-4000-8000-000000000000/amend",
    get: only(["admin", "editor", "qc"], 404),
    post: only(["admin", "editor", "qc"], 404),
    note: "unknown id",
  },
  {
    path: "/test-records/:id/print",
    sample: "/test-records/00000000-0000-4000-8000-000000000000/print",
    get: { ...ALL(404), anon: 302 },
    note: "unknown id",
  },
  // runs (unknown ids: the guard answers first, then 404)
  { path: "/runs/start", get: only(STAFF), post: only(STAFF, 400), note: "empty form: field errors" },
  {
    path: "/runs/:id",
    sample: "/runs/00000000-0000-4000-8000-000000000000",
    get: { ...ALL(404), anon: 302 },
    post: only(STAFF, 404),
    note: "unknown id; apprentices may read a run, not work it",
  },
  { path: "/calculators", get: SIGNED_IN },
  { path: "/calculators/preload", get: SIGNED_IN, post: { ...ALL(400), anon: 302 }, note: "empty form: field errors" },
  { path: "/calculators/distortion", get: SIGNED_IN, post: { ...ALL(400), anon: 302 } },
  { path: "/calculators/clearance", get: SIGNED_IN, post: { ...ALL(400), anon: 302 } },
  { path: "/search", get: SIGNED_IN },
  { path: "/search/words", get: only(["admin", "editor"]), post: only(["admin", "editor"], 400), note: "empty form: unknown action" },
  { path: "/admin", get: only(["admin"]), post: undefined },
  { path: "/admin/people", get: only(["admin"]), post: only(["admin"], 400) },
  { path: "/admin/outbox", get: only(["admin"]) },
  { path: "/admin/search", get: only(["admin"]), post: only(["admin"], 400), note: "empty form: refused" },

  // ---- API ----
  { path: "/api/me", get: SIGNED_IN_API },
  { path: "/api/builds/:number", sample: "/api/builds/LEW-24-0117", get: SIGNED_IN_API },
  {
    path: "/api/calc/preload",
    get: { ...ALL(405), anon: 401 },
    post: { ...ALL(400), anon: 401 },
    note: "GET: 405 with Allow: POST; an empty form is not JSON",
  },
  { path: "/api/calc/distortion", get: { ...ALL(405), anon: 401 }, post: { ...ALL(400), anon: 401 } },
  { path: "/api/calc/clearance", get: { ...ALL(405), anon: 401 }, post: { ...ALL(400), anon: 401 } },
  { path: "/api/procedures/titles", sample: "/api/procedures/titles?q=stud", get: SIGNED_IN_API },
  { path: "/api/procedures/recordings", get: SIGNED_IN_API },
  {
    path: "/api/procedures/revisions/:id",
    sample: "/api/procedures/revisions/00000000-0000-4000-8000-000000000000",
    get: only(["admin", "editor", "builder"], 404, 401),
    post: only(["admin", "editor", "builder"], 422, 401),
  },
  // recordings (unknown ids: the guard answers first, then 404)
  {
    path: "/api/uploads/*",
    sample: "/api/uploads",
    get: only(STAFF, 200, 401),
    note: "GET lists the caller's unfinished uploads; tus verbs are in recordings.test.ts",
  },
  { path: "/api/recordings", get: SIGNED_IN_API },
  {
    path: "/api/recordings/:id",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 405, 401),
    note: "PATCH puts the recording on a build (builds-attach.test.ts)",
  },
  {
    path: "/api/recordings/:id/media",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/media",
    get: { ...ALL(404), anon: 401 },
  },
  {
    path: "/api/recordings/:id/poster",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/poster",
    get: { ...ALL(404), anon: 401 },
  },
  {
    path: "/api/recordings/:id/original",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/original",
    get: only(STAFF, 404, 401),
  },
  {
    path: "/api/recordings/:id/marks",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/marks",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 404, 401),
    note: "unknown recording: 404 after the guard",
  },
  {
    path: "/api/recordings/:id/marks/:markId",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/marks/00000000-0000-4000-8000-000000000001",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 405, 401),
  },
  {
    path: "/api/recordings/:id/readings",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/readings",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 404, 401),
  },
  {
    path: "/api/recordings/:id/readings/:readingId",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/readings/00000000-0000-4000-8000-000000000001",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 405, 401),
  },
  {
    path: "/api/recordings/:id/captions",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/captions",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 422, 401),
    note: "POST: a form without a caption file is a 422 with the reason, before the recording is looked up",
  },
  {
    path: "/api/recordings/:id/captions/:cueId",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/captions/00000000-0000-4000-8000-000000000001",
    get: { ...ALL(404), anon: 401 },
    post: only(STAFF, 405, 401),
    note: "a correction is a PATCH (captions.test.ts)",
  },
  {
    path: "/api/recordings/:id/captions.vtt",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/captions.vtt",
    get: { ...ALL(404), anon: 401 },
  },
  {
    path: "/api/recordings/:id/captions.srt",
    sample: "/api/recordings/00000000-0000-4000-8000-000000000000/captions.srt",
    get: { ...ALL(404), anon: 401 },
  },
  {
    path: "/api/runs/:id/entries",
    sample: "/api/runs/00000000-0000-4000-8000-000000000000/entries",
    get: only(STAFF, 405, 401),
    post: only(STAFF, 422, 401),
    note: "an empty form is no entries: 422 before the run is looked up",
  },
  {
    path: "/api/runs/:id/photos",
    sample: "/api/runs/00000000-0000-4000-8000-000000000000/photos",
    get: only(STAFF, 405, 401),
    post: only(STAFF, 422, 401),
  },
  {
    path: "/api/runs/:id/photos/:photoId",
    sample: "/api/runs/00000000-0000-4000-8000-000000000000/photos/00000000-0000-4000-8000-000000000001",
    get: { ...ALL(404), anon: 401 },
  },
  { path: "/api/search", sample: "/api/search?q=torque", get: SIGNED_IN_API },
];

describe("route × role matrix", () => {
  const cookies: Partial<Record<Who, string>> = {};
  beforeAll(async () => {
    for (const role of ROLES) cookies[role] = (await createUser(role)).cookie;
  });

  it("has an entry for every route of the route config, and none for routes that are gone", () => {
    const configured = [...new Set(configuredRoutes().map((r) => r.path))].sort();
    const listed = MATRIX.map((e) => e.path).sort();
    expect(listed).toEqual(configured);
  });

  const who: Who[] = ["anon", ...ROLES];
  for (const entry of MATRIX) {
    it(`GET ${entry.sample ?? entry.path}`, async () => {
      const got: Record<string, number> = {};
      for (const w of who) {
        const res = await http(entry.sample ?? entry.path, { cookie: cookies[w as Role] });
        got[w] = res.status;
        await res.body?.cancel();
      }
      expect(got).toEqual(entry.get);
    });
    if (entry.post) {
      it(`POST ${entry.sample ?? entry.path} (empty form)`, async () => {
        const got: Record<string, number> = {};
        for (const w of who) {
          const res = await http(entry.sample ?? entry.path, { method: "POST", form: {}, cookie: cookies[w as Role] });
          got[w] = res.status;
          await res.body?.cancel();
        }
        expect(got).toEqual(entry.post);
      });
    }
  }
});
