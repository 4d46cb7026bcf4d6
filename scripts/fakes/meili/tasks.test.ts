/** The asynchronous task model, observed through the SDK: enqueued → processing → succeeded / failed. */
import { Meilisearch, MeilisearchTaskTimeOutError } from "meilisearch";
import { afterAll, beforeAll, describe, expect, it, onTestFinished } from "vitest";
import { startMeiliFake, type MeiliFake } from "./server";

let fake: MeiliFake;
let client: Meilisearch;

beforeAll(async () => {
  // each task stays in `processing` for 150 ms so that polling can see every state
  fake = await startMeiliFake({ port: 0, processingDelayMs: 150 });
  client = new Meilisearch({ host: fake.url });
});
afterAll(() => fake.close());

describe("task lifecycle", () => {
  it("goes enqueued → processing → succeeded, with timestamps and a duration", async () => {
    // A fake of its own keeps each task 1 s in processing: with 150 ms a busy machine (2 cores,
    // several test runs) had started the second task before the test asked for it.
    const slow = await startMeiliFake({ port: 0, processingDelayMs: 1_000 });
    onTestFinished(() => slow.close());
    const client = new Meilisearch({ host: slow.url });
    const first = await client.createIndex("life", { primaryKey: "id" });
    const second = await client.index("life").addDocuments([{ id: 1, title: "Cam timing" }]);
    expect(first.status).toBe("enqueued");
    expect(second.taskUid).toBe(first.taskUid + 1);

    const queued = await client.tasks.getTask(second.taskUid);
    expect(queued).toEqual(
      expect.objectContaining({ status: "enqueued", startedAt: null, finishedAt: null, duration: null, batchUid: null }),
    );
    expect(queued.details).toEqual({ receivedDocuments: 1, indexedDocuments: null });

    const seen = new Set<string>();
    for (let i = 0; i < 100; i++) {
      const t = await client.tasks.getTask(first.taskUid);
      seen.add(t.status);
      if (t.status === "succeeded") break;
      await new Promise((r) => setTimeout(r, 20));
    }
    expect([...seen]).toEqual(expect.arrayContaining(["processing", "succeeded"]));
    expect((await client.tasks.getTasks({ statuses: ["enqueued", "processing"] })).results.map((t) => t.uid)).toContain(second.taskUid);
    expect((await client.index("life").getStats()).isIndexing).toBe(true);

    const done = await client.tasks.waitForTask(second.taskUid);
    expect(done).toEqual(
      expect.objectContaining({
        status: "succeeded",
        type: "documentAdditionOrUpdate",
        error: null,
        batchUid: expect.any(Number),
        duration: expect.stringMatching(/^PT/),
      }),
    );
    expect(done.details).toEqual({ receivedDocuments: 1, indexedDocuments: 1 });
    expect(Date.parse(done.enqueuedAt) <= Date.parse(done.startedAt!) && Date.parse(done.startedAt!) <= Date.parse(done.finishedAt!)).toBe(
      true,
    );
    expect((await client.index("life").getStats()).isIndexing).toBe(false);
  });

  it("processes tasks in order: a search sees a write only once its task succeeded", async () => {
    // the index that this test and the next share
    await client
      .index("life")
      .addDocuments([{ id: 1, title: "Cam timing" }], { primaryKey: "id" })
      .waitTask();
    const t = await client.index("life").addDocuments([{ id: 2, title: "Valve lash" }]);
    expect((await client.index("life").search("lash")).hits).toEqual([]);
    await client.tasks.waitForTask(t);
    expect((await client.index("life").search("lash")).hits.map((h) => h.id)).toEqual([2]);
  });

  // Published: POST /tasks/cancel cancels "enqueued or processing" tasks matching the filter; a
  // canceled task has status `canceled` and `canceledBy` the cancelation's uid, and changed
  // nothing (https://www.meilisearch.com/docs/reference/api/tasks#cancel-tasks). Here a task in
  // `processing` and one still `enqueued` are both canceled (a fake of its own keeps each task
  // 2 s in processing, so that the cancelation surely finds them so).
  it("cancels a processing and an enqueued task: they end canceled and change nothing", async () => {
    const slow = await startMeiliFake({ port: 0, processingDelayMs: 2_000 });
    const client = new Meilisearch({ host: slow.url });
    await client.createIndex("cancel", { primaryKey: "id" });
    await slow.store.drain();
    const a = await client.index("cancel").addDocuments([{ id: 1, title: "Crank end play" }]);
    const b = await client.index("cancel").addDocuments([{ id: 2, title: "Rod side clearance" }]);
    while ((await client.tasks.getTask(a.taskUid)).status === "enqueued") await new Promise((r) => setTimeout(r, 10));
    expect((await client.tasks.getTask(a.taskUid)).status).toBe("processing");
    expect((await client.tasks.getTask(b.taskUid)).status).toBe("enqueued");
    const cancel = await client.tasks.cancelTasks({ indexUids: ["cancel"], statuses: ["enqueued", "processing"] }).waitTask();
    expect(cancel.details).toEqual({
      matchedTasks: 2,
      canceledTasks: 2,
      originalFilter: "?indexUids=cancel&statuses=enqueued%2Cprocessing",
    });
    for (const uid of [a.taskUid, b.taskUid]) {
      const t = await client.tasks.waitForTask(uid);
      expect(t).toEqual(
        expect.objectContaining({ status: "canceled", canceledBy: cancel.uid, error: null, finishedAt: expect.any(String) }),
      );
      expect(t.details).toEqual({ receivedDocuments: 1, indexedDocuments: 0 });
    }
    expect((await client.index("cancel").getDocuments()).results).toEqual([]);
    expect((await client.tasks.getTasks({ canceledBy: [cancel.uid] })).results.map((t) => t.uid).sort()).toEqual(
      [a.taskUid, b.taskUid].sort(),
    );
    await slow.close();
  }, 15_000);

  it("reports a failed task with its error (waitTask does not throw)", async () => {
    const t = await client
      .index("life")
      .addDocuments([{ title: "no id" }])
      .waitTask();
    expect(t.status).toBe("failed");
    expect(t.error).toEqual({
      message: 'Document doesn\'t have a `id` attribute: `{"title":"no id"}`.',
      code: "missing_document_id",
      type: "invalid_request",
      link: "https://docs.meilisearch.com/errors#missing_document_id",
    });
    expect(t.details).toEqual({ receivedDocuments: 1, indexedDocuments: 0 });
    // a failed batch changes nothing
    expect((await client.index("life").getStats()).numberOfDocuments).toBe(2);
  });

  it("fails primary key inference clearly", async () => {
    const t = await client
      .index("nokey")
      .addDocuments([{ name: "x" }])
      .waitTask();
    expect(t.status).toBe("failed");
    expect(t.error?.code).toBe("index_primary_key_no_candidate_found");
    const m = await client
      .index("twokeys")
      .addDocuments([{ id: 1, part_id: 2 }])
      .waitTask();
    expect(m.error?.code).toBe("index_primary_key_multiple_candidates_found");
  });

  it("times out in waitForTask when a task takes longer than asked", async () => {
    const t = await client.index("life").addDocuments([{ id: 3, title: "Slow" }]);
    await expect(client.tasks.waitForTask(t.taskUid, { timeout: 50, interval: 10 })).rejects.toBeInstanceOf(MeilisearchTaskTimeOutError);
    expect((await client.tasks.waitForTask(t.taskUid)).status).toBe("succeeded");
  });

  it("waits for several tasks", async () => {
    const tasks = client.index("life").addDocumentsInBatches(
      Array.from({ length: 5 }, (_, i) => ({ id: 10 + i, title: `Batch ${i}` })),
      2,
    );
    const done = await client.tasks.waitForTasks(await Promise.all(tasks));
    expect(done.map((t) => t.status)).toEqual(["succeeded", "succeeded", "succeeded"]);
  });
});
