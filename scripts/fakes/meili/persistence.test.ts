/** With a data folder, the fake keeps indexes, settings, documents and tasks across restarts. */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Meilisearch } from "meilisearch";
import { afterEach, describe, expect, it } from "vitest";
import { startMeiliFake, type MeiliFake } from "./server";

const dirs: string[] = [];
const fakes: MeiliFake[] = [];
const tmp = () => {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), "meili-fake-"));
  dirs.push(d);
  return d;
};
const start = async (dataDir: string) => {
  const f = await startMeiliFake({ port: 0, dataDir });
  fakes.push(f);
  return { fake: f, client: new Meilisearch({ host: f.url }) };
};

afterEach(async () => {
  for (const f of fakes.splice(0)) await f.close();
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

async function populate(client: Meilisearch) {
  const idx = client.index("kb");
  await client.createIndex("kb", { primaryKey: "id" }).waitTask();
  await idx.updateSettings({ filterableAttributes: ["kind"], synonyms: { ptw: ["piston to wall"] } }).waitTask();
  await idx
    .addDocuments([
      { id: 1, kind: "spec", title: "Piston to wall clearance" },
      { id: 2, kind: "mark", title: "Deck height" },
      { id: 3, kind: "mark", title: "Cam card" },
    ])
    .waitTask();
  await idx.updateDocuments([{ id: 2, title: "Deck height, block 7" }]).waitTask();
  await idx.deleteDocument(3).waitTask();
  return (await client.tasks.getTasks({ limit: 1 })).results[0].uid;
}

async function expectPopulated(client: Meilisearch, lastTask: number) {
  const idx = client.index("kb");
  expect((await client.getRawIndex("kb")).primaryKey).toBe("id");
  expect((await idx.getSettings()).synonyms).toEqual({ ptw: ["piston to wall"] });
  expect((await idx.getDocuments()).results).toEqual([
    { id: 1, kind: "spec", title: "Piston to wall clearance" },
    { id: 2, kind: "mark", title: "Deck height, block 7" },
  ]);
  expect((await idx.search("ptw")).hits.map((h) => h.id)).toEqual([1]);
  expect((await idx.search("", { filter: "kind = mark" })).hits.map((h) => h.id)).toEqual([2]);
  expect((await client.tasks.getTask(lastTask)).status).toBe("succeeded");
  const next = await client.createIndex("other").waitTask();
  expect(next.uid).toBe(lastTask + 1);
}

describe("persistence under a data folder", () => {
  it("survives a clean restart", async () => {
    const dir = tmp();
    const a = await start(dir);
    const last = await populate(a.client);
    await a.fake.close();
    expect(fs.existsSync(path.join(dir, "snapshot.ndjson"))).toBe(true);
    const b = await start(dir);
    await expectPopulated(b.client, last);
  });

  it("survives a crash: every task reported succeeded is in the journal", async () => {
    const dir = tmp();
    const a = await start(dir);
    const last = await populate(a.client);
    // copy the folder while the first fake still runs, as if it had been killed now
    const crashed = tmp();
    for (const f of fs.readdirSync(dir)) fs.copyFileSync(path.join(dir, f), path.join(crashed, f));
    expect(fs.statSync(path.join(crashed, "journal.ndjson")).size).toBeGreaterThan(0);
    // and a half-written last line, as a crash in the middle of a write leaves
    fs.appendFileSync(path.join(crashed, "journal.ndjson"), '{"task":{"uid":999,"sta');
    const b = await start(crashed);
    await expectPopulated(b.client, last);
  });

  it("starts empty on an empty folder, and stays in memory without one", async () => {
    const { client } = await start(tmp());
    expect((await client.getRawIndexes()).total).toBe(0);
    const mem = await startMeiliFake({ port: 0 });
    fakes.push(mem);
    expect(mem.store.indexes.size).toBe(0);
  });
});
