/** The benchmark module runs end to end on a small corpus (the real run is `tsx bench.ts`). */
import { describe, expect, it } from "vitest";
import { benchQueries, generateCorpus, runMeiliBench } from "./bench";

describe("bench", () => {
  it("generates a Zipf corpus: a quarter long documents, invented words", () => {
    const c = generateCorpus({ docs: 400, vocabulary: 2000 });
    expect(c.docs).toHaveLength(400);
    const long = c.docs.filter((d) => d.kind === "procedure");
    expect(long).toHaveLength(100);
    for (const d of long) expect(d.body.split(" ").length).toBeGreaterThanOrEqual(500);
    for (const d of c.docs.filter((d) => d.kind !== "procedure")) expect(d.body.split(" ").length).toBeLessThanOrEqual(40);
    const [top] = [...c.df.entries()].sort((a, b) => b[1] - a[1]);
    expect(top[1]).toBeGreaterThan(300); // the commonest word is in most documents
    const q = benchQueries(c, 5);
    expect(Object.keys(q)).toEqual(["one-word mid", "one-word common", "three-word mid", "three-word common", "typo mid", "typo common"]);
  });

  it("returns latencies for the SDK, the engine and minisearch", async () => {
    const r = await runMeiliBench({ docs: 300, vocabulary: 1500, samples: 4 });
    expect(r.docs).toBe(300);
    expect(r.indexing.ms).toBeGreaterThan(0);
    expect(Object.keys(r.cases)).toHaveLength(6);
    for (const c of Object.values(r.cases)) {
      // every query of the case went through each of the three paths
      for (const s of [c.sdk, c.engine, c.minisearch!]) expect(s.samples).toBe(4);
      expect(c.meanEstimatedTotalHits).toBeGreaterThan(0);
    }
    expect(Object.keys(r.targets)).toHaveLength(5);
  }, 60_000);
});
