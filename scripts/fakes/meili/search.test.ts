/**
 * Search behaviour of the fake, through the SDK: the shop's numbers and units as tokens,
 * ranking, synonyms, typo and prefix rules, highlighting and cropping, facets, and the
 * less common parameters. (The shapes shared with a real Meilisearch are in contract.test.ts.)
 */
import { Meilisearch, type Index } from "meilisearch";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMeiliFake, type MeiliFake } from "./server";

type Doc = {
  id: number;
  kind: string;
  title: string;
  body: string;
  tags?: string[];
  state?: string;
  year?: number;
  meta?: { state: string };
};

const DOCS: Doc[] = [
  {
    id: 1,
    kind: "spec",
    title: "Piston to wall clearance",
    body: "Piston-to-wall 0.0030–0.0035 in (0.076–0.089 mm) for forged 4032 pistons.",
    tags: ["pistons"],
    state: "published",
    year: 2021,
  },
  {
    id: 2,
    kind: "procedure",
    title: "Head studs",
    body: "Torque the M12x1.5 head studs to 110 N·m with molybdenum disulfide paste.",
    tags: ["head"],
    state: "published",
    year: 2022,
  },
  {
    id: 3,
    kind: "mark",
    title: "PTW measured",
    body: "Cylinder 4 ptw at the skirt.",
    tags: ["pistons"],
    state: "draft",
    year: 2023,
    meta: { state: "draft" },
  },
  {
    id: 4,
    kind: "reading",
    title: "Thread check",
    body: "Gauge reads M12 x 1.5 on the spare stud; clamp load verified.",
    tags: ["head"],
    state: "published",
    year: 2020,
  },
  {
    id: 5,
    kind: "spec",
    title: "Ring end gap",
    body: "Top ring 0.0045 in per inch of bore; second ring 0.0050 in.",
    tags: ["rings"],
    state: "published",
    year: 2019,
  },
  {
    id: 6,
    kind: "procedure",
    title: "Preload check for main caps",
    body: "Stretch gauge on every cap bolt, thou readings logged.",
    tags: ["bottom end"],
    state: "published",
    year: 2024,
  },
  {
    id: 7,
    kind: "mark",
    title: "Oil pressure at idle",
    body: "Warm idle pressure noted on the dyno sheet.",
    tags: ["oil"],
    state: "published",
    year: 2024,
  },
  {
    id: 8,
    kind: "mark",
    title: "Bearing clearance",
    body: "Main bearing clearance 0.0025 in with plastigage strip.",
    tags: ["bottom end"],
    state: "published",
    year: 2018,
  },
];

let fake: MeiliFake;
let client: Meilisearch;
let idx: Index<Doc>;
const ids = (r: { hits: { id: number }[] }) => r.hits.map((h) => h.id);

beforeAll(async () => {
  fake = await startMeiliFake({ port: 0 });
  client = new Meilisearch({ host: fake.url });
  idx = client.index<Doc>("shop");
  await idx
    .updateSettings({
      searchableAttributes: ["title", "body", "tags"],
      filterableAttributes: ["kind", "tags", "state", "year", "meta.state"],
      sortableAttributes: ["year"],
      synonyms: {
        ptw: ["piston to wall"],
        "piston to wall": ["ptw"],
        "clamp load": ["preload"],
        preload: ["clamp load"],
        thou: ["0.001 in"],
        moly: ["molybdenum disulfide"],
      },
    })
    .waitTask();
  const t = await idx.addDocuments(DOCS, { primaryKey: "id" }).waitTask();
  expect(t.status).toBe("succeeded");
});

afterAll(() => fake.close());

describe("numbers, units and designations are tokens", () => {
  it("finds a decimal exactly first (typos on numbers are allowed, as in Meilisearch)", async () => {
    const r = await idx.search("0.0035");
    expect(r.hits[0].id).toBe(1);
  });

  it.each([
    [".0035", [1]],
    ["M12x1.5", [2, 4]],
    ["m12", [2, 4]],
    ["110", [2]],
    ["110 N·m", [2]],
    ["n·m", [2]],
    ["nm", [2]],
    ["4032", [1]],
    ["0.076", [1]],
    ["piston-to-wall", [1, 3]],
  ])("%s", async (q, expected) => {
    expect(ids(await idx.search(q)).sort()).toEqual(expected);
  });

  it("does not split a decimal number into its digits", async () => {
    expect(ids(await idx.search("30"))).toEqual([]);
    expect(ids(await idx.search("003 "))).toEqual([]); // a trailing space: no prefix search
  });
});

describe("ranking", () => {
  it("puts documents holding every query word first, then fewer words", async () => {
    const r = await idx.search("bearing clearance 0.0025");
    expect(r.hits[0].id).toBe(8);
    expect(ids(r)).toEqual(expect.arrayContaining([8]));
  });

  it("ranks an exact word before a typo", async () => {
    await idx
      .addDocuments([
        { id: 100, kind: "mark", title: "Gauge zeroed", body: "gauges" },
        { id: 101, kind: "mark", title: "Guage note", body: "misspelt" },
      ])
      .waitTask();
    const r = await idx.search("guage");
    expect(r.hits[0].id).toBe(101);
    expect(ids(r)).toContain(100);
    await idx.deleteDocuments([100, 101]).waitTask();
  });

  it("ranks a title match before a body match (attribute rule)", async () => {
    const r = await idx.search("clearance");
    expect(ids(r).slice(0, 2).sort()).toEqual([1, 8]);
  });

  it("gives ranking scores between 0 and 1 in decreasing order", async () => {
    const r = await idx.search("ring gap", { showRankingScore: true });
    const scores = r.hits.map((h) => h._rankingScore!);
    expect(scores.length).toBeGreaterThan(0);
    for (const s of scores) {
      expect(s).toBeGreaterThan(0);
      expect(s).toBeLessThanOrEqual(1);
    }
    expect([...scores].sort((a, b) => b - a)).toEqual(scores);
  });
});

describe("synonyms", () => {
  it("applies multi-word synonyms both ways", async () => {
    expect(ids(await idx.search("ptw")).sort()).toEqual([1, 3]);
    expect(ids(await idx.search("piston to wall")).sort()).toEqual([1, 3]);
    expect(ids(await idx.search("preload")).sort()).toEqual([4, 6]);
    expect(ids(await idx.search("clamp load")).sort()).toEqual([4, 6]);
    expect(ids(await idx.search("moly"))).toEqual([2]);
  });

  it("highlights what a synonym matched", async () => {
    const r = await idx.search("ptw", { attributesToHighlight: ["title", "body"] });
    expect(r.hits.find((h) => h.id === 1)?._formatted?.title).toBe("<em>Piston</em> <em>to</em> <em>wall</em> clearance");
  });
});

describe("typos and prefixes", () => {
  it("allows one typo from 5 letters and two from 9, none below", async () => {
    expect(ids(await idx.search("bearng"))).toEqual([8]);
    expect(ids(await idx.search("plastigaeg"))).toEqual([8]);
    expect(ids(await idx.search("rng"))).toEqual([]);
    expect(ids(await idx.search("cylindre"))).toEqual([3]); // a swap of neighbours is one typo
  });

  it("completes only the last word as a prefix", async () => {
    expect(ids(await idx.search("wall pist")).sort()).toEqual([1]);
    expect(ids(await idx.search("pist wall"))).toEqual([]);
    expect(ids(await idx.search("pist "))).toEqual([]);
  });

  it("highlights only the typed prefix of a completed word", async () => {
    const r = await idx.search("plasti", { attributesToHighlight: ["body"] });
    expect(r.hits[0]._formatted?.body).toContain("<em>plasti</em>gage");
  });

  it("honours typoTolerance settings (numbers without typos)", async () => {
    expect(ids(await idx.search("0.0036"))).toEqual([1]);
    await idx.updateTypoTolerance({ disableOnNumbers: true }).waitTask();
    expect(ids(await idx.search("0.0036"))).toEqual([]);
    await idx.updateTypoTolerance({ disableOnNumbers: false }).waitTask();
  });

  it("drops stop words from the query", async () => {
    await idx.updateStopWords(["the"]).waitTask();
    expect(ids(await idx.search("the dyno"))).toEqual([7]);
    await idx.resetStopWords().waitTask();
  });
});

describe("query syntax", () => {
  it("excludes negative words and matches quoted phrases", async () => {
    expect(ids(await idx.search("pistons -forged"))).toEqual([3]);
    expect(ids(await idx.search("ring -second")).includes(5)).toBe(false);
    expect(ids(await idx.search('"main bearing"'))).toEqual([8]);
  });

  it("searches only the given attributes", async () => {
    expect(ids(await idx.search("stud", { attributesToSearchOn: ["title"] }))).toEqual([2]);
    expect(ids(await idx.search("stud")).sort()).toEqual([2, 4]);
  });

  it("supports matchingStrategy all and frequency", async () => {
    expect(ids(await idx.search("idle dyno bearing", { matchingStrategy: "all" }))).toEqual([]);
    expect(ids(await idx.search("idle dyno bearing"))).toEqual([7]);
    // "clearance" is the more frequent word: `frequency` drops it first, `last` drops "dyno"
    expect(ids(await idx.search("clearance dyno")).sort()).toEqual([1, 8]);
    expect(ids(await idx.search("clearance dyno", { matchingStrategy: "frequency" }))).toEqual([7]);
  });
});

describe("formatting", () => {
  it("crops around the matches with markers, cropLength and attr:length", async () => {
    const r = await idx.search("plastigage", { attributesToCrop: ["body:3"], attributesToHighlight: ["body"] });
    expect(r.hits[0]._formatted?.body).toBe("…with <em>plastigage</em> strip.");
    const c = await idx.search("pressure", { attributesToCrop: ["body"], cropLength: 3, cropMarker: "~" });
    expect(c.hits[0]._formatted?.body).toBe("~idle pressure noted~");
    const whole = await idx.search("dyno", { attributesToCrop: ["body"], cropLength: 50 });
    expect(whole.hits[0]._formatted?.body).toBe(DOCS[6].body);
  });

  it("crops from the start when nothing matched in that attribute", async () => {
    const r = await idx.search("dyno", { attributesToCrop: ["title"], cropLength: 2 });
    expect(r.hits[0]._formatted?.title).toBe("Oil pressure…");
  });

  it("highlights every word a typed prefix completes, and none it sits inside", async () => {
    // The words that begin alike are looked for in one scan (format.ts): each must still be
    // found wherever it stands, and "arbor" or "harbored", which hold the letters, must not be.
    const body = "Check the bore, then the boring bar; the arbor stays. The borescope shows the bore harbored no scoring.";
    await idx.addDocuments([{ id: 51, kind: "procedure", title: "Prefix scan", body }]).waitTask();
    try {
      const r = await idx.search("bor", { attributesToHighlight: ["body"], filter: "kind = procedure" });
      expect(r.hits.find((h) => h.id === 51)?._formatted?.body).toBe(
        "Check the <em>bor</em>e, then the <em>bor</em>ing bar; the arbor stays. The <em>bor</em>escope shows the <em>bor</em>e harbored no scoring.",
      );
      const whole = await idx.search("bore", { attributesToHighlight: ["body"], filter: "kind = procedure" });
      expect(whole.hits.find((h) => h.id === 51)?._formatted?.body).toBe(
        "Check the <em>bore</em>, then the boring bar; the arbor stays. The <em>bore</em>scope shows the <em>bore</em> harbored no scoring.",
      );
    } finally {
      await idx.deleteDocument(51).waitTask();
    }
  });

  it("reports match positions", async () => {
    const r = await idx.search("dyno", { showMatchesPosition: true });
    expect(r.hits[0]._matchesPosition).toEqual({ body: [{ start: 32, length: 4 }] });
  });

  it("formats a long text quickly and correctly", async () => {
    const words = Array.from({ length: 3000 }, (_, i) => (i === 2500 ? "crankshaft" : `w${i % 97}`)).join(" ");
    await idx.addDocuments([{ id: 50, kind: "procedure", title: "Long", body: words }]).waitTask();
    const r = await idx.search("crankshaft", { attributesToCrop: ["body"], cropLength: 5, attributesToHighlight: ["body"] });
    try {
      // the neighbours of word 2500 are w(2498 % 97) = w73 … w77
      expect(r.hits[0]._formatted?.body).toBe("…w73 w74 <em>crankshaft</em> w76 w77…");
    } finally {
      await idx.deleteDocument(50).waitTask();
    }
  });
});

describe("facets, distinct, display and filters", () => {
  it("sorts facet values by count and caps them", async () => {
    await idx.updateFaceting({ maxValuesPerFacet: 2, sortFacetValuesBy: { kind: "count" } }).waitTask();
    const r = await idx.search("", { facets: ["kind"] });
    expect(r.facetDistribution).toEqual({ kind: { mark: 3, procedure: 2 } });
    await idx.resetFaceting().waitTask();
    const all = await idx.search("", { facets: ["kind"] });
    expect(all.facetDistribution?.kind).toEqual({ mark: 3, procedure: 2, reading: 1, spec: 2 });
  });

  it("filters case-insensitively, on numbers and on nested fields", async () => {
    expect(ids(await idx.search("", { filter: "kind = PROCEDURE" })).sort()).toEqual([2, 6]);
    expect(ids(await idx.search("", { filter: "meta.state = draft" }))).toEqual([3]);
    expect(ids(await idx.search("", { filter: "year >= 2023 AND year < 2024.5" })).sort()).toEqual([3, 6, 7]);
    expect(ids(await idx.search("", { filter: "tags = 'bottom end'" })).sort()).toEqual([6, 8]);
    expect(ids(await idx.search("", { filter: "meta.state NOT EXISTS AND kind = mark" })).sort()).toEqual([7, 8]);
  });

  it("keeps one hit per distinct value", async () => {
    const r = await idx.search("", { distinct: "kind", sort: ["year:asc"] });
    expect(r.hits.map((h) => h.kind)).toEqual(["mark", "spec", "reading", "procedure"]);
    expect(r.estimatedTotalHits).toBe(4);
  });

  it("hides attributes that are not displayed", async () => {
    const name = "display";
    const i2 = client.index(name);
    await i2.updateDisplayedAttributes(["id", "title"]).waitTask();
    await i2.addDocuments(DOCS.slice(0, 2), { primaryKey: "id" }).waitTask();
    expect(await i2.getDocument(1)).toEqual({ id: 1, title: DOCS[0].title });
    const r = await i2.search("torque", { attributesToHighlight: ["*"] });
    expect(r.hits).toEqual([{ id: 2, title: "Head studs", _formatted: { id: "2", title: "Head studs" } }]);
  });

  it("searches facet values", async () => {
    const r = await idx.searchForFacetValues({ facetName: "tags", facetQuery: "pis" });
    expect(r.facetHits).toEqual([{ value: "pistons", count: 2 }]);
  });
});

describe("index swaps, task deletion, compaction", () => {
  it("swaps two indexes", async () => {
    await client
      .index("swap_a")
      .addDocuments([{ id: 1, v: "a" }])
      .waitTask();
    await client
      .index("swap_b")
      .addDocuments([{ id: 1, v: "b" }])
      .waitTask();
    const t = await client.swapIndexes([{ indexes: ["swap_a", "swap_b"], rename: false }]).waitTask();
    expect(t).toEqual(expect.objectContaining({ status: "succeeded", type: "indexSwap", indexUid: null }));
    expect(await client.index("swap_a").getDocument(1)).toEqual({ id: 1, v: "b" });
  });

  it("deletes finished tasks", async () => {
    const before = await client.tasks.getTasks({ indexUids: ["swap_a"] });
    expect(before.total).toBeGreaterThan(0);
    const t = await client.tasks.deleteTasks({ indexUids: ["swap_a"] }).waitTask();
    expect(t).toEqual(expect.objectContaining({ status: "succeeded", type: "taskDeletion" }));
    expect(t.details).toEqual(expect.objectContaining({ deletedTasks: before.total }));
    expect((await client.tasks.getTasks({ indexUids: ["swap_a"] })).total).toBe(0);
  });

  it("stays correct after many replacements and deletions (purged posting lists)", async () => {
    const many = client.index<{ id: number; text: string; n: number }>("churn");
    await many.updateSettings({ filterableAttributes: ["n"], typoTolerance: { enabled: false } }).waitTask();
    for (let round = 0; round < 4; round++)
      await many
        .addDocuments(Array.from({ length: 1500 }, (_, i) => ({ id: i, text: `round${round} common word${i % 10}`, n: i % 10 })))
        .waitTask();
    await many.deleteDocuments({ filter: "n >= 5" }).waitTask();
    const r = await many.search("common", { limit: 0 });
    expect(r.estimatedTotalHits).toBe(750);
    expect((await many.search("round0", { limit: 0 })).estimatedTotalHits).toBe(0);
    expect((await many.search("round3 word7", { limit: 0, matchingStrategy: "all" })).estimatedTotalHits).toBe(0);
    expect((await many.search("round3 word2", { limit: 0, matchingStrategy: "all" })).estimatedTotalHits).toBe(150);
    const stats = await many.getStats();
    expect(stats.numberOfDocuments).toBe(750);
  });
});
