/**
 * Contract suite: every endpoint the app uses, exercised through the real `meilisearch` SDK.
 * It always runs against the fake (on a random loopback port) and, when MEILI_HOST is set
 * (with MEILI_API_KEY if that server needs a key), also against that real Meilisearch, so
 * that the fake is held to the same shapes. It asserts only what a real server satisfies.
 */
import { Meilisearch, MeilisearchApiError, type Index } from "meilisearch";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMeiliFake } from "./server";

type Doc = { id: string; kind: string; title: string; body: string; tags: string[]; state: string; year: number; hours: number };

// invented shop data
const DOCS: Doc[] = [
  {
    id: "p1",
    kind: "procedure",
    title: "Piston to wall clearance for forged 4032 pistons",
    body: "Measure piston-to-wall 0.0030–0.0035 in below the oil ring, bore gauge zeroed at 20 °C.",
    tags: ["pistons", "bore"],
    state: "published",
    year: 2021,
    hours: 1.5,
  },
  {
    id: "p2",
    kind: "procedure",
    title: "Head stud installation",
    body: "Lubricate the threads with moly paste, then torque the M12x1.5 studs to 110 N·m in three even steps, centre out.",
    tags: ["head", "studs"],
    state: "draft",
    year: 2023,
    hours: 2,
  },
  {
    id: "m1",
    kind: "mark",
    title: "Ring gap check",
    body: "Top ring gap measured at 0.018 in on cylinder 3.",
    tags: ["rings"],
    state: "published",
    year: 2022,
    hours: 0.25,
  },
  {
    id: "m2",
    kind: "mark",
    title: "PTW re-check after honing",
    body: "Clearance grew by a tenth after the final hone.",
    tags: ["pistons"],
    state: "published",
    year: 2024,
    hours: 0.5,
  },
  {
    id: "r1",
    kind: "reading",
    title: "Bore diameter",
    body: "Cylinder 2 bore 4.0005 in, taper within limits.",
    tags: ["bore"],
    state: "published",
    year: 2020,
    hours: 0.1,
  },
  ...Array.from({ length: 30 }, (_, i) => ({
    id: `f${i}`,
    kind: "mark",
    title: `Valve train audit ${i}`,
    body: `Audit entry ${i}: rocker torque sheet signed.`,
    tags: ["audit"],
    state: "published",
    year: 1990 + i,
    hours: i,
  })),
];

async function apiError(
  p: Promise<unknown>,
): Promise<{ status: number; body: { message: string; code: string; type: string; link: string } }> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(MeilisearchApiError);
    const err = e as MeilisearchApiError;
    const body = err.cause as { message: string; code: string; type: string; link: string };
    expect(body).toEqual({ message: expect.any(String), code: expect.any(String), type: expect.any(String), link: expect.any(String) });
    return { status: err.response.status, body };
  }
  throw new Error("expected the request to fail");
}

type Target = { name: string; connect(): Promise<{ client: Meilisearch; stop(): Promise<void> }> };

const targets: Target[] = [
  {
    name: "the fake",
    async connect() {
      const fake = await startMeiliFake({ port: 0 });
      return { client: new Meilisearch({ host: fake.url }), stop: () => fake.close() };
    },
  },
];
if (process.env.MEILI_HOST) {
  targets.push({
    name: `real Meilisearch at ${process.env.MEILI_HOST}`,
    async connect() {
      return { client: new Meilisearch({ host: process.env.MEILI_HOST!, apiKey: process.env.MEILI_API_KEY }), stop: async () => {} };
    },
  });
} else {
  // Not a skipped test: the suite below simply has one target fewer. Said in the output.
  console.info(
    "[meili contract] MEILI_HOST is not set: the suite runs against the fake only; set MEILI_HOST (and MEILI_API_KEY) to run it against a real Meilisearch too.",
  );
}

for (const target of targets) {
  describe(`Meilisearch contract against ${target.name}`, () => {
    let client: Meilisearch;
    let stop: () => Promise<void>;
    const run = `c${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;
    const uid = `${run}_items`;
    let index: Index<Doc>;

    beforeAll(async () => {
      ({ client, stop } = await target.connect());
      console.info(`[meili contract] running against ${target.name} (indexes prefixed ${run}_)`);
      index = client.index<Doc>(uid);
      const created = await client.createIndex(uid, { primaryKey: "id" }).waitTask();
      expect(created.status).toBe("succeeded");
      const settings = await index
        .updateSettings({
          searchableAttributes: ["title", "tags", "body"],
          filterableAttributes: ["kind", "tags", "state", "year"],
          sortableAttributes: ["year", "title"],
          synonyms: { ptw: ["piston to wall"], "piston to wall": ["ptw"] },
        })
        .waitTask();
      expect(settings.status).toBe("succeeded");
      const added = await index.addDocuments(DOCS).waitTask();
      expect(added.status).toBe("succeeded");
    });

    afterAll(async () => {
      const { results } = await client.getRawIndexes({ limit: 1000 });
      for (const i of results.filter((r) => r.uid.startsWith(`${run}_`))) await client.deleteIndex(i.uid).waitTask();
      await stop();
    });

    describe("health and version", () => {
      // Published: GET /health answers `{ status: "available" }`; GET /version answers `commitSha`,
      // `commitDate`, `pkgVersion` (https://www.meilisearch.com/docs/reference/api/health,
      // https://www.meilisearch.com/docs/reference/api/version).
      it("GET /health and /version", async () => {
        expect(await client.health()).toEqual({ status: "available" });
        expect(await client.isHealthy()).toBe(true);
        const v = await client.getVersion();
        expect(v).toEqual(
          expect.objectContaining({ commitSha: expect.any(String), commitDate: expect.any(String), pkgVersion: expect.any(String) }),
        );
      });
    });

    describe("indexes", () => {
      // Published: creating, updating and deleting an index are asynchronous: 202 with an enqueued task; an
      // index has `uid`, `primaryKey`, `createdAt`, `updatedAt`; a second creation fails its task with
      // `index_already_exists` (https://www.meilisearch.com/docs/reference/api/indexes).
      it("creates, gets, lists, updates and deletes an index through tasks", async () => {
        const name = `${run}_tmp`;
        const enqueued = await client.createIndex(name);
        expect(enqueued).toEqual({
          taskUid: expect.any(Number),
          indexUid: name,
          status: "enqueued",
          type: "indexCreation",
          enqueuedAt: expect.any(String),
        });
        const task = await client.tasks.waitForTask(enqueued.taskUid);
        expect(task).toEqual(
          expect.objectContaining({
            uid: enqueued.taskUid,
            indexUid: name,
            status: "succeeded",
            type: "indexCreation",
            canceledBy: null,
            error: null,
            duration: expect.stringMatching(/^PT\d+(\.\d+)?S$/),
            enqueuedAt: expect.any(String),
            startedAt: expect.any(String),
            finishedAt: expect.any(String),
          }),
        );
        expect(task.details).toEqual(expect.objectContaining({ primaryKey: null }));

        const raw = await client.getRawIndex(name);
        expect(raw).toEqual(
          expect.objectContaining({ uid: name, primaryKey: null, createdAt: expect.any(String), updatedAt: expect.any(String) }),
        );
        const fetched = await client.getIndex(name);
        expect(fetched.uid).toBe(name);

        const list = await client.getRawIndexes({ limit: 1000 });
        expect(list).toEqual(expect.objectContaining({ offset: 0, limit: 1000, total: expect.any(Number) }));
        expect(list.results.map((r) => r.uid)).toEqual(expect.arrayContaining([name, uid]));

        const upd = await client.updateIndex(name, { primaryKey: "ref" }).waitTask();
        expect(upd.status).toBe("succeeded");
        expect((await client.getRawIndex(name)).primaryKey).toBe("ref");

        const dup = await client.createIndex(name).waitTask();
        expect(dup.status).toBe("failed");
        expect(dup.error).toEqual({
          message: expect.any(String),
          code: "index_already_exists",
          type: "invalid_request",
          link: expect.any(String),
        });

        const del = await client.deleteIndex(name).waitTask();
        expect(del).toEqual(expect.objectContaining({ status: "succeeded", type: "indexDeletion" }));
        const missing = await apiError(client.getIndex(name));
        expect(missing.status).toBe(404);
        expect(missing.body.code).toBe("index_not_found");

        const again = await client.deleteIndex(name).waitTask();
        expect(again.status).toBe("failed");
        expect(again.error?.code).toBe("index_not_found");
      });

      // Published: an index uid holds only alphanumerics, hyphens and underscores, else `invalid_index_uid`
      // (https://www.meilisearch.com/docs/reference/errors/error_codes#invalid_index_uid).
      it("answers 400 invalid_index_uid for a bad uid", async () => {
        const r = await apiError(client.createIndex("not a valid uid!"));
        expect(r.status).toBe(400);
        expect(r.body.code).toBe("invalid_index_uid");
      });
    });

    describe("settings", () => {
      // Published: PATCH /settings changes only the settings it names; the default ranking rules are words,
      // typo, proximity, attribute, sort, exactness
      // (https://www.meilisearch.com/docs/reference/api/settings).
      it("GET /settings reflects PATCH, with the default ranking rules", async () => {
        const s = await index.getSettings();
        expect(s).toEqual(
          expect.objectContaining({
            searchableAttributes: ["title", "tags", "body"],
            sortableAttributes: expect.arrayContaining(["year", "title"]),
            displayedAttributes: ["*"],
            rankingRules: ["words", "typo", "proximity", "attribute", "sort", "exactness"],
            synonyms: { ptw: ["piston to wall"], "piston to wall": ["ptw"] },
            stopWords: [],
            distinctAttribute: null,
          }),
        );
        expect([...(s.filterableAttributes as string[])].sort()).toEqual(["kind", "state", "tags", "year"]);
        expect(s.typoTolerance).toEqual(expect.objectContaining({ enabled: true, minWordSizeForTypos: { oneTypo: 5, twoTypos: 9 } }));
        expect(s.pagination).toEqual({ maxTotalHits: 1000 });
      });

      // Published: each setting has its own route to get, update and reset it (DELETE restores the default)
      // (https://www.meilisearch.com/docs/reference/api/settings).
      it("sub-routes: get, update and reset single settings", async () => {
        const name = `${run}_settings`;
        const idx = client.index(name);
        const t = await idx.updateSearchableAttributes(["title"]).waitTask();
        expect(t).toEqual(expect.objectContaining({ status: "succeeded", type: "settingsUpdate", indexUid: name }));
        expect(t.details).toEqual(expect.objectContaining({ searchableAttributes: ["title"] }));
        expect(await idx.getSearchableAttributes()).toEqual(["title"]);
        await idx.updateFilterableAttributes(["kind"]).waitTask();
        expect(await idx.getFilterableAttributes()).toEqual(["kind"]);
        await idx.updateSortableAttributes(["year"]).waitTask();
        expect(await idx.getSortableAttributes()).toEqual(["year"]);
        await idx.updateDisplayedAttributes(["title", "kind"]).waitTask();
        expect(await idx.getDisplayedAttributes()).toEqual(["title", "kind"]);
        await idx.updateSynonyms({ moly: ["molybdenum disulfide"] }).waitTask();
        expect(await idx.getSynonyms()).toEqual({ moly: ["molybdenum disulfide"] });
        await idx.updateRankingRules(["words", "typo", "sort", "attribute", "proximity", "exactness", "year:desc"]).waitTask();
        expect(await idx.getRankingRules()).toEqual(["words", "typo", "sort", "attribute", "proximity", "exactness", "year:desc"]);
        await idx.updateTypoTolerance({ disableOnNumbers: true }).waitTask();
        expect((await idx.getTypoTolerance())?.disableOnNumbers).toBe(true);
        await idx.resetSynonyms().waitTask();
        expect(await idx.getSynonyms()).toEqual({});
        await idx.resetRankingRules().waitTask();
        expect(await idx.getRankingRules()).toEqual(["words", "typo", "proximity", "attribute", "sort", "exactness"]);
        await idx.resetSettings().waitTask();
        const s = await idx.getSettings();
        expect(s.searchableAttributes).toEqual(["*"]);
        expect(s.filterableAttributes).toEqual([]);
        expect(s.displayedAttributes).toEqual(["*"]);
      });

      // Published: a setting of the wrong type answers 400 with its `invalid_settings_…` code
      // (https://www.meilisearch.com/docs/reference/errors/error_codes).
      it("rejects an invalid settings payload with 400", async () => {
        const r = await apiError(index.updateSettings({ filterableAttributes: "kind" as unknown as string[] }));
        expect(r.status).toBe(400);
        expect(r.body.code).toBe("invalid_settings_filterable_attributes");
      });
    });

    describe("documents", () => {
      // Published: GET /documents/{id} and GET /documents with `offset`, `limit`, `fields`, answering
      // `results`, `offset`, `limit`, `total` (https://www.meilisearch.com/docs/reference/api/documents).
      it("gets one document and lists documents with offset, limit and fields", async () => {
        expect(await index.getDocument("p1")).toEqual(DOCS[0]);
        expect(await index.getDocument("p1", { fields: ["id", "title"] })).toEqual({ id: "p1", title: DOCS[0].title });
        const page = await index.getDocuments({ offset: 2, limit: 3, fields: ["id"] });
        expect(page).toEqual({ results: expect.any(Array), offset: 2, limit: 3, total: DOCS.length });
        expect(page.results).toHaveLength(3);
        for (const r of page.results) expect(Object.keys(r)).toEqual(["id"]);
        const missing = await apiError(index.getDocument("nope"));
        expect(missing.status).toBe(404);
        expect(missing.body.code).toBe("document_not_found");
      });

      // Published: POST /documents/fetch takes a `filter` on filterable attributes
      // (https://www.meilisearch.com/docs/reference/api/documents#get-documents-with-post).
      it("fetches documents with a filter (POST /documents/fetch)", async () => {
        const r = await index.getDocuments({ filter: "kind = reading OR tags = rings", fields: ["id"], limit: 10 });
        expect(r.results.map((d) => d.id).sort()).toEqual(["m1", "r1"]);
        expect(r.total).toBe(2);
      });

      // Published: POST /documents adds or replaces, PUT adds or updates (merging fields); deletion by id,
      // by batch, by filter and all (https://www.meilisearch.com/docs/reference/api/documents).
      it("adds, partially updates and deletes documents (one, batch, by filter, all)", async () => {
        const name = `${run}_docs`;
        const idx = client.index<Doc>(name);
        const add = await idx.addDocuments(DOCS.slice(0, 5), { primaryKey: "id" }).waitTask();
        expect(add).toEqual(expect.objectContaining({ status: "succeeded", type: "documentAdditionOrUpdate", indexUid: name }));
        expect(add.details).toEqual(expect.objectContaining({ receivedDocuments: 5, indexedDocuments: 5 }));
        expect((await client.getRawIndex(name)).primaryKey).toBe("id");

        const upd = await idx.updateDocuments([{ id: "p1", state: "archived" }]).waitTask();
        expect(upd.status).toBe("succeeded");
        expect(await idx.getDocument("p1")).toEqual({ ...DOCS[0], state: "archived" });

        const replaced = await idx.addDocuments([{ ...DOCS[1], title: "Head stud installation, revised" }]).waitTask();
        expect(replaced.status).toBe("succeeded");
        expect((await idx.getDocument("p2")).title).toBe("Head stud installation, revised");

        const one = await idx.deleteDocument("m1").waitTask();
        expect(one).toEqual(expect.objectContaining({ status: "succeeded", type: "documentDeletion" }));
        expect(one.details).toEqual(expect.objectContaining({ deletedDocuments: 1 }));
        expect((await apiError(idx.getDocument("m1"))).status).toBe(404);

        const batch = await idx.deleteDocuments(["m2", "nope"]).waitTask();
        expect(batch.details).toEqual(expect.objectContaining({ providedIds: 2, deletedDocuments: 1 }));

        await idx.updateFilterableAttributes(["kind"]).waitTask();
        const byFilter = await idx.deleteDocuments({ filter: "kind = reading" }).waitTask();
        expect(byFilter.status).toBe("succeeded");
        expect(byFilter.details).toEqual(expect.objectContaining({ deletedDocuments: 1, originalFilter: '"kind = reading"' }));
        expect((await idx.getDocuments()).total).toBe(2);

        const all = await idx.deleteAllDocuments().waitTask();
        expect(all).toEqual(expect.objectContaining({ status: "succeeded", type: "documentDeletion" }));
        expect(all.details).toEqual(expect.objectContaining({ deletedDocuments: 2 }));
        expect((await idx.getDocuments()).total).toBe(0);
      });

      // Published: a bad document id fails the task with `invalid_document_id`; a deletion filter on an
      // attribute that is not filterable fails with `invalid_document_filter`
      // (https://www.meilisearch.com/docs/reference/errors/error_codes).
      it("fails the task for an invalid document id, and for a filter on a non-filterable attribute", async () => {
        const t = await index.addDocuments([{ ...DOCS[0], id: "bad id!" }]).waitTask();
        expect(t.status).toBe("failed");
        expect(t.error).toEqual({
          message: expect.any(String),
          code: "invalid_document_id",
          type: "invalid_request",
          link: expect.any(String),
        });
        const f = await index.deleteDocuments({ filter: "title = x" }).waitTask();
        expect(f.status).toBe("failed");
        expect(f.error?.code).toBe("invalid_document_filter");
        const syntax = await apiError(index.deleteDocuments({ filter: "kind = " }));
        expect(syntax.status).toBe(400);
        expect(syntax.body.code).toBe("invalid_document_filter");
      });
    });

    describe("search", () => {
      // Published: a search answers `hits`, `query`, `processingTimeMs`, `limit`, `offset`,
      // `estimatedTotalHits`; GET takes the same parameters
      // (https://www.meilisearch.com/docs/reference/api/search#response).
      it("answers the response shape for POST and GET", async () => {
        const r = await index.search("piston");
        expect(r).toEqual(
          expect.objectContaining({
            hits: expect.any(Array),
            query: "piston",
            processingTimeMs: expect.any(Number),
            limit: 20,
            offset: 0,
            estimatedTotalHits: expect.any(Number),
          }),
        );
        expect(r.hits.map((h) => h.id)).toContain("p1");
        expect(r.hits[0]).not.toHaveProperty("_formatted");
        const g = await index.searchGet("piston", { filter: "kind = procedure", facets: ["kind"] });
        expect(g.hits.map((h) => h.id)).toEqual(["p1"]);
        expect(g.facetDistribution).toEqual({ kind: { procedure: 1 } });
      });

      // Published: the `words` rule ranks documents holding every query word first; with matchingStrategy
      // `last` words are dropped from the end, with `all` every word is required
      // (https://www.meilisearch.com/docs/reference/api/search#matching-strategy,
      // https://www.meilisearch.com/docs/learn/relevancy/ranking_rules).
      it("ranks documents holding every query word first", async () => {
        const r = await index.search("torque moly");
        expect(r.hits[0].id).toBe("p2");
        expect(r.hits.length).toBeGreaterThan(1);
        // with the default `last` strategy the first word is required: only p2 holds "head"
        expect((await index.search("head stud torque")).hits.map((h) => h.id)).toEqual(["p2"]);
        const all = await index.search("torque moly", { matchingStrategy: "all" });
        expect(all.hits.map((h) => h.id)).toEqual(["p2"]);
      });

      // Published: one typo from 5 letters, two from 9; the last query word is completed as a prefix
      // (https://www.meilisearch.com/docs/learn/relevancy/typo_tolerance_settings,
      // https://www.meilisearch.com/docs/learn/engine/prefix).
      it("forgives a typo and completes the last word as a prefix", async () => {
        expect((await index.search("lubricat")).hits.map((h) => h.id)).toEqual(["p2"]);
        expect((await index.search("honnig")).hits.map((h) => h.id)).toEqual(["m2"]);
        expect((await index.search("cylindr")).hits.map((h) => h.id).sort()).toEqual(["m1", "r1"]);
      });

      // Published: synonyms apply as set, multi-word ones included; each direction is listed
      // (https://www.meilisearch.com/docs/learn/relevancy/synonyms).
      it("applies synonyms from the settings, multi-word ones too", async () => {
        expect((await index.search("ptw")).hits.map((h) => h.id)).toEqual(expect.arrayContaining(["p1", "m2"]));
        expect((await index.search("piston to wall")).hits.map((h) => h.id)).toEqual(expect.arrayContaining(["p1", "m2"]));
      });

      // Published: `filter` is a string expression or an array: outer elements joined by AND, inner arrays
      // by OR (https://www.meilisearch.com/docs/reference/api/search#filter).
      it("filters with strings and nested arrays (outer AND, inner OR)", async () => {
        const ids = async (filter: string | (string | string[])[], q = "") =>
          (await index.search(q, { filter, limit: 100 })).hits.map((h) => h.id).sort();
        expect(await ids("kind = procedure AND state = published")).toEqual(["p1"]);
        expect(await ids([["kind = mark", "kind = reading"], "tags = bore"])).toEqual(["r1"]);
        expect(await ids("tags IN [rings, bore] AND NOT kind = procedure")).toEqual(["m1", "r1"]);
        expect(await ids("kind != mark")).toEqual(["p1", "p2", "r1"]);
        expect(await ids("tags NOT IN [audit, bore, pistons]")).toEqual(["m1", "p2"]);
        expect(await ids("year > 2020 AND (kind = procedure OR kind = reading)")).toEqual(["p1", "p2"]);
        expect(await ids("year 2020 TO 2022 AND kind != mark")).toEqual(["p1", "r1"]);
        expect(await ids("state = 'draft'", "head")).toEqual(["p2"]);
      });

      // Published: a malformed filter answers 400 `invalid_search_filter`
      // (https://www.meilisearch.com/docs/reference/errors/error_codes#invalid_search_filter).
      it("rejects a malformed filter with 400 invalid_search_filter", async () => {
        const r = await apiError(index.search("", { filter: "kind = procedure AND" }));
        expect(r.status).toBe(400);
        expect(r.body).toEqual({
          message: expect.stringMatching(/^Was expecting an operation .*\n21:21 kind = procedure AND$/s),
          code: "invalid_search_filter",
          type: "invalid_request",
          link: "https://docs.meilisearch.com/errors#invalid_search_filter",
        });
        const quote = await apiError(index.search("", { filter: ["kind = 'procedure"] }));
        expect(quote.body.message).toBe(
          "Expression `\\'procedure` is missing the following closing delimiter: `'`.\n8:18 kind = 'procedure",
        );
      });

      // Published: filtering on an attribute not in `filterableAttributes` answers `invalid_search_filter`
      // (https://www.meilisearch.com/docs/reference/api/search#filter).
      it("rejects a filter on a non-filterable attribute", async () => {
        const r = await apiError(index.search("", { filter: "title = x" }));
        expect(r.status).toBe(400);
        expect(r.body.code).toBe("invalid_search_filter");
        expect(r.body.message).toMatch(/Attribute `title` is not filterable/);
      });

      // Published: `facets` answers `facetDistribution` counted over every match, and `facetStats` (min,
      // max) for numbers (https://www.meilisearch.com/docs/reference/api/search#facets).
      it("counts facets over every match", async () => {
        const r = await index.search("", { facets: ["kind", "tags", "year"], limit: 0 });
        const count = (f: (d: Doc) => string[]) => {
          const out: Record<string, number> = {};
          for (const d of DOCS) for (const v of f(d)) out[v] = (out[v] ?? 0) + 1;
          return out;
        };
        expect(r.hits).toEqual([]);
        expect(r.facetDistribution?.kind).toEqual(count((d) => [d.kind]));
        expect(r.facetDistribution?.tags).toEqual(count((d) => d.tags));
        expect(r.facetStats?.year).toEqual({ min: 1990, max: 2024 });
        const q = await index.search("bore", { facets: ["kind"] });
        expect(q.facetDistribution).toEqual({ kind: { procedure: 1, reading: 1 } });
        const bad = await apiError(index.search("", { facets: ["title"] }));
        expect(bad.body.code).toBe("invalid_search_facets");
      });

      // Published: `attributesToHighlight` with `highlightPreTag`/`highlightPostTag`, `attributesToCrop`
      // with `cropLength`/`cropMarker`, in `_formatted`
      // (https://www.meilisearch.com/docs/reference/api/search#attributes-to-highlight,
      // https://www.meilisearch.com/docs/reference/api/search#attributes-to-crop).
      it("highlights with custom tags and crops with a marker", async () => {
        const r = await index.search("moly", { attributesToHighlight: ["body"], highlightPreTag: "<mark>", highlightPostTag: "</mark>" });
        expect(r.hits[0].id).toBe("p2");
        expect(r.hits[0]._formatted?.body).toContain("<mark>moly</mark>");
        expect(r.hits[0]._formatted?.title).toBe(DOCS[1].title);

        const c = await index.search("torque", {
          filter: "kind = procedure",
          attributesToCrop: ["body"],
          cropLength: 5,
          cropMarker: "[…]",
          attributesToHighlight: ["body"],
        });
        const body = c.hits[0]._formatted?.body as string;
        expect(body).toContain("<em>torque</em>");
        expect(body.startsWith("[…]") || body.endsWith("[…]")).toBe(true);
        expect(
          body
            .replace(/<\/?em>/g, "")
            .replace(/\[…\]/g, "")
            .trim()
            .split(/\s+/).length,
        ).toBeLessThanOrEqual(6);

        const whole = await index.search("ring", { attributesToHighlight: ["*"], filter: "kind = mark AND tags = rings" });
        expect(whole.hits[0]._formatted?.title).toBe("<em>Ring</em> gap check");
        expect(whole.hits[0]._formatted?.year).toBe("2022");
      });

      // Published: `attributesToRetrieve` limits the attributes of each hit
      // (https://www.meilisearch.com/docs/reference/api/search#attributes-to-retrieve).
      it("retrieves only the requested attributes", async () => {
        const r = await index.search("bore", { attributesToRetrieve: ["id", "title"] });
        for (const h of r.hits) expect(Object.keys(h).sort()).toEqual(["id", "title"]);
      });

      // Published: `offset`/`limit` answer `estimatedTotalHits`; `page`/`hitsPerPage` answer the exhaustive
      // `totalHits` and `totalPages` instead (https://www.meilisearch.com/docs/reference/api/search#page,
      // https://www.meilisearch.com/docs/reference/api/search#number-of-results-per-page).
      it("paginates with limit/offset and with page/hitsPerPage", async () => {
        const a = await index.search("audit", { limit: 10, offset: 0 });
        const b = await index.search("audit", { limit: 10, offset: 10 });
        expect(b).toEqual(expect.objectContaining({ limit: 10, offset: 10 }));
        expect(a.hits).toHaveLength(10);
        expect(b.hits).toHaveLength(10);
        expect(a.estimatedTotalHits).toBeGreaterThanOrEqual(30);
        const seen = new Set(a.hits.map((h) => h.id));
        for (const h of b.hits) expect(seen.has(h.id)).toBe(false);
        const p = await index.search("audit", { hitsPerPage: 7, page: 5 });
        expect(p).toEqual(expect.objectContaining({ hitsPerPage: 7, page: 5, totalHits: 30, totalPages: 5 }));
        expect(p.hits).toHaveLength(2);
        expect(p).not.toHaveProperty("estimatedTotalHits");
      });

      // Published: "If you set `page` to `0`, Meilisearch processes your request, but does not
      // return any documents. In this case, the response body will include the exhaustive values
      // for `totalPages` and `totalHits`." (API reference, Search › Page:
      // https://www.meilisearch.com/docs/reference/api/search#page)
      it("page 0 returns no hits, with the exhaustive totals", async () => {
        const p = await index.search("audit", { hitsPerPage: 7, page: 0 });
        expect(p.hits).toEqual([]);
        expect(p).toEqual(expect.objectContaining({ hitsPerPage: 7, page: 0, totalHits: 30, totalPages: 5 }));
      });

      // Published: one typo from 5 letters, two from 9 ("minWordSizeForTypos",
      // https://www.meilisearch.com/docs/learn/relevancy/typo_tolerance_settings), and "a typo on
      // the first character of a word is counted as two typos" (Typo tolerance vs fuzzy search,
      // https://www.meilisearch.com/docs/resources/internals/typo_tolerance).
      it("counts a typo on a word's first letter as two", async () => {
        // "cylinder" (8 letters) may take one typo: inside the word, yes; on its first letter, no.
        expect((await index.search("cylindar ")).hits.map((h) => h.id).sort()).toEqual(["m1", "r1"]);
        expect((await index.search("xylinder ")).hits).toEqual([]);
        // "clearance" (9 letters) may take two: its first letter's typo spends both.
        const k = await index.search("klearance ", { showRankingScoreDetails: true });
        expect(k.hits.map((h) => h.id).sort()).toEqual(["m2", "p1"]);
        for (const h of k.hits) expect(h._rankingScoreDetails?.typo).toEqual(expect.objectContaining({ typoCount: 2 }));
        expect((await index.search("klearanse ")).hits).toEqual([]); // first letter (2) + one more
      });

      // Published: "showRankingScoreDetails … adds a `_rankingScoreDetails` object to each hit
      // with the score of every ranking rule", each with its `order` in the ranking rules and its
      // `score`; `words` gives `matchingWords`/`maxMatchingWords`, `typo` gives
      // `typoCount`/`maxTypoCount`, a sort rule gives the hit's `value` (API reference, Search ›
      // Ranking score details: https://www.meilisearch.com/docs/reference/api/search#ranking-score-details).
      it("answers _rankingScoreDetails per hit: the rules that ranked it, in their order", async () => {
        const r = await index.search("torque moly", { showRankingScoreDetails: true });
        const d = r.hits[0]._rankingScoreDetails!;
        expect(r.hits[0].id).toBe("p2");
        expect(d.words).toEqual({ order: 0, matchingWords: 2, maxMatchingWords: 2, score: 1 });
        expect(d.typo).toEqual(expect.objectContaining({ order: 1, typoCount: 0, score: 1 }));
        expect(d.attribute).toEqual(expect.objectContaining({ order: 3, score: expect.any(Number) }));
        expect(d.exactness).toEqual(expect.objectContaining({ order: 5, matchType: expect.any(String), score: expect.any(Number) }));
        const partial = r.hits.find((h) => h.id !== "p2")!._rankingScoreDetails!;
        expect(partial.words).toEqual(expect.objectContaining({ matchingWords: 1, maxMatchingWords: 2 }));
        expect(partial.words!.score).toBeLessThan(1);
        const sorted = await index.search("audit", { sort: ["year:desc"], limit: 1, showRankingScoreDetails: true });
        expect(sorted.hits[0]._rankingScoreDetails!["year:desc"]).toEqual({ order: 4, value: 2019 });
        expect((await index.search("audit", { limit: 1 })).hits[0]).not.toHaveProperty("_rankingScoreDetails");
      });

      // Published: `sort` takes `attribute:asc|desc` on sortable attributes, else `invalid_search_sort`
      // (https://www.meilisearch.com/docs/reference/api/search#sort).
      it("sorts on sortable attributes and rejects others", async () => {
        const r = await index.search("", { filter: "tags = audit", sort: ["year:desc"], limit: 5 });
        expect(r.hits.map((h) => h.year)).toEqual([2019, 2018, 2017, 2016, 2015]);
        const t = await index.search("", { filter: "kind = procedure", sort: ["title:asc"] });
        expect(t.hits.map((h) => h.id)).toEqual(["p2", "p1"]);
        const bad = await apiError(index.search("", { sort: ["hours:asc"] }));
        expect(bad.status).toBe(400);
        expect(bad.body.code).toBe("invalid_search_sort");
      });

      // Published: an empty `q` is a placeholder search over every document
      // (https://www.meilisearch.com/docs/reference/api/search#placeholder-search).
      it("counts every document in a placeholder search", async () => {
        const r = await index.search("", { limit: 1 });
        expect(r.estimatedTotalHits).toBe(DOCS.length);
        expect(r.query).toBe("");
      });

      // Published: an unknown index answers 404 `index_not_found` with message, code, type and link
      // (https://www.meilisearch.com/docs/reference/errors/error_codes#index_not_found).
      it("answers 404 index_not_found for an unknown index", async () => {
        const r = await apiError(client.index(`${run}_missing`).search("x"));
        expect(r.status).toBe(404);
        expect(r.body).toEqual({
          message: `Index \`${run}_missing\` not found.`,
          code: "index_not_found",
          type: "invalid_request",
          link: "https://docs.meilisearch.com/errors#index_not_found",
        });
      });

      // Published: POST /multi-search answers `results`, one per query, each with its `indexUid`
      // (https://www.meilisearch.com/docs/reference/api/multi_search).
      it("multi-search answers one result per query", async () => {
        const r = await client.multiSearch({
          queries: [
            { indexUid: uid, q: "bore", limit: 1 },
            { indexUid: uid, q: "", filter: "kind = procedure" },
          ],
        });
        expect(r.results).toHaveLength(2);
        expect(r.results[0]).toEqual(expect.objectContaining({ indexUid: uid, query: "bore", limit: 1 }));
        expect(r.results[1].hits.map((h) => h.id).sort()).toEqual(["p1", "p2"]);
      });
    });

    describe("relevancy settings the app relies on", () => {
      // Its own index: these settings would change the ranking the cases above expect.
      const rel = `${run}_relevancy`;
      type Item = { id: string; title: string; lines: string[]; kindWeight: number };
      const ITEMS: Item[] = [
        { id: "reading", title: "stud 4 torque 110 N·m", lines: ["pass 3 lube moly"], kindWeight: 1 },
        { id: "spec", title: "Head stud final torque", lines: ["moly on threads and washer face"], kindWeight: 5 },
        { id: "note", title: "Stud torque", lines: ["dry threads"], kindWeight: 9 },
        {
          id: "bench",
          title: "Clamp load readings",
          lines: ["stud 1 moly 49.8 kN", "stud 2 dry 47.1 kN", "stud 3 moly 50.6 kN"],
          kindWeight: 1,
        },
      ];
      let ix: Index<Item>;
      beforeAll(async () => {
        ix = client.index<Item>(rel);
        expect((await client.createIndex(rel, { primaryKey: "id" }).waitTask()).status).toBe("succeeded");
        const s = await ix
          .updateSettings({
            searchableAttributes: ["title", "lines"],
            rankingRules: ["words", "typo", "kindWeight:desc", "proximity", "attribute", "sort", "exactness"],
            typoTolerance: { minWordSizeForTypos: { oneTypo: 4, twoTypos: 9 } },
          })
          .waitTask();
        expect(s.status).toBe("succeeded");
        expect((await ix.addDocuments(ITEMS).waitTask()).status).toBe("succeeded");
      });

      // Published: a custom ranking rule `attribute:desc` on a numeric field, placed anywhere in
      // `rankingRules`, sorts by that field the documents the rules before it left equal; the rules
      // before it still decide first (Custom ranking rules,
      // https://www.meilisearch.com/docs/learn/relevancy/custom_ranking_rules; Ranking rules,
      // https://www.meilisearch.com/docs/learn/relevancy/ranking_rules).
      it("a custom ranking rule after words and typo puts the heavier of equal matches first", async () => {
        const r = await ix.search("stud torque moly", { showRankingScoreDetails: true });
        // "note" weighs most but lacks "moly", "bench" lacks "torque": `words` goes before the custom rule.
        expect(r.hits.map((h) => h.id)).toEqual(["spec", "reading", "note", "bench"]);
        expect(r.hits[0]._rankingScoreDetails!["kindWeight:desc"]).toEqual({ order: 2, value: 5 });
        expect((await ix.getRankingRules())[2]).toBe("kindWeight:desc");
      });

      // Published: `minWordSizeForTypos.oneTypo` is the length from which a word accepts one typo
      // (default 5), and a swap of two neighbouring letters is one typo (Typo tolerance settings,
      // https://www.meilisearch.com/docs/learn/relevancy/typo_tolerance_settings#minwordsizefortypos).
      it("minWordSizeForTypos.oneTypo 4 lets a four-letter word take one typo, a swap included", async () => {
        const r = await ix.search("mloy ");
        expect(r.hits.map((h) => h.id).sort()).toEqual(["bench", "reading", "spec"]);
        expect((await ix.getTypoTolerance())?.minWordSizeForTypos).toEqual({ oneTypo: 4, twoTypos: 9 });
        // Three letters still take none.
        expect((await ix.search("stu ", { attributesToSearchOn: ["title"] })).hits).toEqual([]);
      });

      // Published: an array of strings is searchable, and `_formatted` highlights it element by
      // element, keeping the array's order and length (Search › Attributes to highlight,
      // https://www.meilisearch.com/docs/reference/api/search#attributes-to-highlight).
      it("highlights an array of strings element by element", async () => {
        const r = await ix.search("moly", { filter: undefined, attributesToHighlight: ["lines"], attributesToRetrieve: ["id"] });
        const bench = r.hits.find((h) => h.id === "bench")!;
        expect(bench._formatted?.lines).toEqual(["stud 1 <em>moly</em> 49.8 kN", "stud 2 dry 47.1 kN", "stud 3 <em>moly</em> 50.6 kN"]);
      });
    });

    describe("tasks", () => {
      // Published: GET /tasks filters by uids, statuses, types, indexUids, newest first, paged with
      // `limit`/`from`, answering `results`, `total`, `limit`, `from`, `next`; a failed task carries its
      // `error` (https://www.meilisearch.com/docs/reference/api/tasks#get-tasks).
      it("lists tasks with filters and paging", async () => {
        const r = await client.tasks.getTasks({ indexUids: [uid], limit: 2 });
        expect(r).toEqual({
          results: expect.any(Array),
          total: expect.any(Number),
          limit: 2,
          from: expect.any(Number),
          next: expect.any(Number),
        });
        expect(r.results).toHaveLength(2);
        expect(r.results[0].uid).toBeGreaterThan(r.results[1].uid);
        for (const t of r.results) expect(t.indexUid).toBe(uid);
        const next = await client.tasks.getTasks({ indexUids: [uid], limit: 2, from: r.next! });
        expect(next.results[0].uid).toBe(r.next);
        const failed = await client.tasks.getTasks({ statuses: ["failed"], indexUids: [uid] });
        expect(failed.results.length).toBeGreaterThan(0);
        for (const t of failed.results) {
          expect(t.status).toBe("failed");
          expect(t.error).toEqual({
            message: expect.any(String),
            code: expect.any(String),
            type: expect.any(String),
            link: expect.any(String),
          });
        }
        const types = await client.tasks.getTasks({ types: ["settingsUpdate"], indexUids: [uid] });
        for (const t of types.results) expect(t.type).toBe("settingsUpdate");
      });

      // Published: POST /tasks/cancel "Cancel any number of enqueued or processing tasks based on
      // their uid, status, type, indexUid, or the date…"; it answers 202 with a summary whose
      // `type` is `taskCancelation` and `indexUid` is null (a global task); without any filter it
      // answers `missing_task_filters`. A finished task matches the filter but is not canceled.
      // (API reference, Tasks › Cancel tasks: https://www.meilisearch.com/docs/reference/api/tasks#cancel-tasks)
      // Every error carries `message`, `code`, `type` and `link`
      // (https://www.meilisearch.com/docs/reference/errors/overview); `apiError` asserts all four.
      it("cancels tasks by filter as a taskCancelation task, and refuses a cancelation without filters", async () => {
        const refused = await apiError(client.tasks.cancelTasks({}));
        expect(refused.status).toBe(400);
        expect(refused.body.code).toBe("missing_task_filters");
        const done = await index.updateSettings({ stopWords: [] }).waitTask();
        const cancel = await client.tasks.cancelTasks({ uids: [done.uid] });
        expect(cancel).toEqual(
          expect.objectContaining({
            taskUid: expect.any(Number),
            indexUid: null,
            status: "enqueued",
            type: "taskCancelation",
            enqueuedAt: expect.any(String),
          }),
        );
        const finished = await client.tasks.waitForTask(cancel.taskUid);
        expect(finished).toEqual(expect.objectContaining({ status: "succeeded", type: "taskCancelation", indexUid: null, error: null }));
        expect(finished.details).toEqual(
          expect.objectContaining({ matchedTasks: 1, canceledTasks: 0, originalFilter: `?uids=${done.uid}` }),
        );
        expect((await client.tasks.getTask(done.uid)).status).toBe("succeeded");
        const badFilter = await apiError(client.tasks.cancelTasks({ statuses: ["nonsense" as never] }));
        expect(badFilter.body.code).toBe("invalid_task_statuses");
      });

      // Published: an unknown task uid answers 404 `task_not_found`
      // (https://www.meilisearch.com/docs/reference/errors/error_codes#task_not_found).
      it("answers 404 task_not_found for an unknown task", async () => {
        const r = await apiError(client.tasks.getTask(2 ** 31));
        expect(r.status).toBe(404);
        expect(r.body.code).toBe("task_not_found");
      });
    });
  });
}
