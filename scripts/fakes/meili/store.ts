/**
 * The fake's state: its indexes, the asynchronous task queue, and (when given a data
 * folder) persistence.
 *
 * Writes are queued as tasks and processed one at a time, in order: `enqueued` →
 * `processing` → `succeeded` / `failed`, as in Meilisearch. With a data folder, a task's
 * effect is appended to `journal.ndjson` and flushed to disk (fdatasync) *before* the task
 * is marked succeeded, so a client that saw `succeeded` never loses that write. On start
 * the fake loads `snapshot.ndjson`, replays the journal, writes a fresh snapshot and
 * empties the journal; it does the same on close. See docs/decisions/002-search-fake-storage.md.
 */
import fs from "node:fs";
import path from "node:path";
import { bad, indexNotFound, MeiliError, taskNotFound, type MeiliErrorBody } from "./errors";
import { MeiliIndex, type Doc } from "./engine";
import type { Settings } from "./settings";

export type TaskStatus = "enqueued" | "processing" | "succeeded" | "failed" | "canceled";
export type TaskType =
  | "indexCreation"
  | "indexUpdate"
  | "indexDeletion"
  | "indexSwap"
  | "documentAdditionOrUpdate"
  | "documentDeletion"
  | "settingsUpdate"
  | "taskCancelation"
  | "taskDeletion";

export type Task = {
  uid: number;
  batchUid: number | null;
  indexUid: string | null;
  status: TaskStatus;
  type: TaskType;
  canceledBy: number | null;
  details: Record<string, unknown> | null;
  error: MeiliErrorBody | null;
  duration: string | null;
  enqueuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  customMetadata?: string;
};

export type Op =
  | { kind: "createIndex"; uid: string; primaryKey: string | null }
  | { kind: "updateIndex"; uid: string; primaryKey: string | null }
  | { kind: "deleteIndex"; uid: string }
  | { kind: "swapIndexes"; swaps: { indexes: [string, string]; rename?: boolean }[] }
  | { kind: "addDocuments"; uid: string; docs: Doc[]; primaryKey: string | null; update: boolean }
  | { kind: "deleteDocuments"; uid: string; ids: (string | number)[] }
  | { kind: "deleteByFilter"; uid: string; filter: unknown }
  | { kind: "deleteAll"; uid: string }
  | { kind: "settings"; uid: string; payload: Record<string, unknown> }
  | { kind: "deleteTasks"; query: TaskQuery; originalFilter: string };

export type TaskQuery = Partial<{
  uids: number[];
  batchUids: number[];
  canceledBy: number[];
  statuses: string[];
  types: string[];
  indexUids: string[];
  afterEnqueuedAt: string;
  beforeEnqueuedAt: string;
  afterStartedAt: string;
  beforeStartedAt: string;
  afterFinishedAt: string;
  beforeFinishedAt: string;
}>;

const MAX_TASKS = 10_000;
const JOURNAL_COMPACT_BYTES = 64 * 1024 * 1024;

const duration = (ms: number) => `PT${(ms / 1000).toFixed(6)}S`;

/** The answer to a write: 202 with the task as enqueued. */
const summaryOf = (t: Task) => ({ taskUid: t.uid, indexUid: t.indexUid, status: t.status, type: t.type, enqueuedAt: t.enqueuedAt });

export type StoreOptions = { dataDir?: string; processingDelayMs?: number };

export class Store {
  indexes = new Map<string, MeiliIndex>();
  private tasks = new Map<number, Task>();
  private nextTaskUid = 0;
  private nextBatchUid = 0;
  private queue: { task: Task; op: Op }[] = [];
  /** Processing tasks a cancelation caught: task uid → the cancelation's uid. */
  private cancelRequested = new Map<number, number>();
  private running: Promise<void> | null = null;
  private journalFd: number | null = null;
  private journalBytes = 0;
  private readonly dataDir?: string;
  private readonly delay: number;
  lastUpdate: string | null = null;

  private constructor(opts: StoreOptions) {
    this.dataDir = opts.dataDir;
    this.delay = opts.processingDelayMs ?? 0;
  }

  static open(opts: StoreOptions = {}): Store {
    const store = new Store(opts);
    if (opts.dataDir) store.load(opts.dataDir);
    return store;
  }

  // -------------------------------------------------------------------------------------
  // tasks

  getIndex(uid: string): MeiliIndex {
    const idx = this.indexes.get(uid);
    if (!idx) throw indexNotFound(uid);
    return idx;
  }

  isIndexing(uid: string): boolean {
    return (
      this.queue.some((q) => q.task.indexUid === uid) ||
      [...this.tasks.values()].some((t) => t.indexUid === uid && t.status === "processing")
    );
  }

  enqueue(type: TaskType, indexUid: string | null, details: Record<string, unknown> | null, op: Op, customMetadata?: string) {
    const task = this.newTask(type, indexUid, details, customMetadata);
    this.queue.push({ task, op });
    this.kick();
    return summaryOf(task);
  }

  /**
   * POST /tasks/cancel: a `taskCancelation` task. As in Meilisearch it goes before the
   * queue (it does not wait for the tasks it cancels): the enqueued tasks matching the filter
   * are canceled, and a task still processing is canceled before it takes effect.
   */
  cancel(query: TaskQuery, originalFilter: string, customMetadata?: string) {
    const task = this.newTask("taskCancelation", null, { matchedTasks: null, canceledTasks: null, originalFilter }, customMetadata);
    setImmediate(() => this.runCancelation(task, query, originalFilter));
    return summaryOf(task);
  }

  private runCancelation(task: Task, query: TaskQuery, originalFilter: string) {
    const t0 = performance.now();
    task.status = "processing";
    task.startedAt = new Date().toISOString();
    task.batchUid = this.nextBatchUid++;
    let matched = 0;
    let canceled = 0;
    for (const t of this.tasks.values()) {
      if (t === task || !taskMatches(t, query)) continue;
      matched++;
      if (t.status === "enqueued") {
        const i = this.queue.findIndex((q) => q.task === t);
        const op = i >= 0 ? this.queue.splice(i, 1)[0].op : null;
        this.finishCanceled(t, task.uid, op);
        canceled++;
      } else if (t.status === "processing" && t.type !== "taskCancelation") {
        this.cancelRequested.set(t.uid, task.uid);
        canceled++;
      }
    }
    task.details = { matchedTasks: matched, canceledTasks: canceled, originalFilter };
    task.finishedAt = new Date().toISOString();
    task.duration = duration(performance.now() - t0);
    this.settle(task, "succeeded");
  }

  /** A task ends canceled: it changed nothing. */
  private finishCanceled(t: Task, by: number, op: Op | null) {
    t.canceledBy = by;
    t.details = op ? failedDetails(op, t.details) : t.details;
    t.finishedAt = new Date().toISOString();
    if (t.startedAt) t.duration = duration(Date.parse(t.finishedAt) - Date.parse(t.startedAt));
    this.settle(t, "canceled");
  }

  /** Records a finished task that changed no index (journal first, then visible). */
  private settle(t: Task, status: "succeeded" | "canceled") {
    this.lastUpdate = t.finishedAt;
    try {
      this.journal({ task: { ...t, status } });
      t.status = status;
    } catch (e) {
      console.error(`[meili-fake] could not write the journal: ${(e as Error).message}`);
      t.status = "failed";
      t.error = new MeiliError(500, "io_error", `The search fake could not persist this task: ${(e as Error).message}`, "system").toJSON();
    }
  }

  private newTask(type: TaskType, indexUid: string | null, details: Record<string, unknown> | null, customMetadata?: string): Task {
    const task: Task = {
      uid: this.nextTaskUid++,
      batchUid: null,
      indexUid,
      status: "enqueued",
      type,
      canceledBy: null,
      details,
      error: null,
      duration: null,
      enqueuedAt: new Date().toISOString(),
      startedAt: null,
      finishedAt: null,
    };
    if (customMetadata !== undefined) task.customMetadata = customMetadata;
    this.tasks.set(task.uid, task);
    return task;
  }

  getTask(uid: number): Task {
    const t = this.tasks.get(uid);
    if (!t) throw taskNotFound(String(uid));
    return t;
  }

  listTasks(q: TaskQuery & { limit?: number; from?: number; reverse?: boolean }) {
    const limit = q.limit ?? 20;
    let all = [...this.tasks.values()].filter((t) => taskMatches(t, q));
    all.sort((a, b) => (q.reverse ? a.uid - b.uid : b.uid - a.uid));
    const total = all.length;
    if (q.from != null) all = all.filter((t) => (q.reverse ? t.uid >= q.from! : t.uid <= q.from!));
    const results = all.slice(0, limit);
    const next = all.length > limit ? all[limit].uid : null;
    return { results, total, limit, from: results.length ? results[0].uid : null, next };
  }

  private kick() {
    if (!this.running) this.running = this.loop().finally(() => (this.running = null));
  }

  private async loop() {
    // start after the current request has been answered
    await new Promise((r) => setImmediate(r));
    while (this.queue.length) {
      const { task, op } = this.queue.shift()!;
      task.status = "processing";
      task.startedAt = new Date().toISOString();
      task.batchUid = this.nextBatchUid++;
      // let pollers observe `processing` (and let other requests through)
      await new Promise((r) => (this.delay > 0 ? setTimeout(r, this.delay) : setImmediate(r)));
      const canceledBy = this.cancelRequested.get(task.uid);
      if (canceledBy !== undefined) {
        this.cancelRequested.delete(task.uid);
        this.finishCanceled(task, canceledBy, op);
        this.trimTasks();
        continue;
      }
      const t0 = performance.now();
      let ok = false;
      try {
        task.details = this.apply(op, task.startedAt, task.details);
        ok = true;
      } catch (e) {
        task.error = (
          e instanceof MeiliError ? e : new MeiliError(500, "internal", String((e as Error)?.message ?? e), "internal")
        ).toJSON();
        task.details = failedDetails(op, task.details);
      }
      task.finishedAt = new Date().toISOString();
      task.duration = duration(performance.now() - t0);
      this.lastUpdate = task.finishedAt;
      const final: Task = { ...task, status: ok ? "succeeded" : "failed" };
      // durable first, visible second
      try {
        this.journal(ok ? { task: final, op } : { task: final });
        task.status = final.status;
      } catch (e) {
        // the effect is applied in memory but not on disk: say so rather than claim success
        console.error(`[meili-fake] could not write the journal: ${(e as Error).message}`);
        task.status = "failed";
        task.error = new MeiliError(
          500,
          "io_error",
          `The search fake could not persist this task: ${(e as Error).message}`,
          "system",
        ).toJSON();
      }
      this.trimTasks();
    }
  }

  /** Waits until every queued task is processed. */
  async drain() {
    while (this.running) await this.running;
  }

  private trimTasks() {
    if (this.tasks.size <= MAX_TASKS) return;
    for (const [uid, t] of this.tasks) {
      if (this.tasks.size <= MAX_TASKS) break;
      if (t.status === "succeeded" || t.status === "failed" || t.status === "canceled") this.tasks.delete(uid);
    }
  }

  /** Performs one operation; returns the task's final details. Throws MeiliError to fail. */
  private apply(op: Op, now: string, details: Record<string, unknown> | null): Record<string, unknown> | null {
    switch (op.kind) {
      case "createIndex": {
        if (this.indexes.has(op.uid)) throw new MeiliError(409, "index_already_exists", `Index \`${op.uid}\` already exists.`);
        this.indexes.set(op.uid, new MeiliIndex(op.uid, op.primaryKey, now));
        return { primaryKey: op.primaryKey };
      }
      case "updateIndex": {
        const idx = this.getIndex(op.uid);
        if (op.primaryKey !== null && op.primaryKey !== idx.primaryKey) {
          if (idx.numberOfDocuments > 0)
            throw new MeiliError(400, "index_primary_key_already_exists", `Index already has a primary key: \`${idx.primaryKey}\`.`);
          idx.primaryKey = op.primaryKey;
        }
        idx.touch(now);
        return { primaryKey: op.primaryKey };
      }
      case "deleteIndex": {
        const idx = this.getIndex(op.uid);
        this.indexes.delete(op.uid);
        return { deletedDocuments: idx.numberOfDocuments };
      }
      case "swapIndexes": {
        for (const s of op.swaps) {
          const [a, b] = s.indexes;
          const ia = this.indexes.get(a);
          const ib = this.indexes.get(b);
          const missing = [!ia && a, !ib && !s.rename && b].filter(Boolean);
          if (missing.length)
            throw new MeiliError(
              404,
              "index_not_found",
              missing.length === 1
                ? `Index \`${missing[0]}\` not found.`
                : `Indexes ${missing.map((m) => `\`${m}\``).join(", ")} not found.`,
            );
          if (s.rename && ib) throw new MeiliError(409, "index_already_exists", `Index \`${b}\` already exists.`);
          this.indexes.delete(a);
          this.indexes.delete(b);
          ia!.uid = b;
          this.indexes.set(b, ia!);
          if (ib) {
            ib.uid = a;
            this.indexes.set(a, ib);
          }
          ia!.touch(now);
          ib?.touch(now);
        }
        return { swaps: op.swaps };
      }
      case "addDocuments": {
        let idx = this.indexes.get(op.uid);
        const created = !idx;
        if (!idx) idx = new MeiliIndex(op.uid, null, now);
        const n = idx.addDocuments(op.docs, { primaryKey: op.primaryKey, update: op.update });
        if (created) this.indexes.set(op.uid, idx);
        idx.touch(now);
        return { receivedDocuments: op.docs.length, indexedDocuments: n };
      }
      case "deleteDocuments": {
        const idx = this.getIndex(op.uid);
        const n = idx.deleteByIds(op.ids);
        idx.touch(now);
        return { providedIds: op.ids.length, deletedDocuments: n };
      }
      case "deleteByFilter": {
        const idx = this.getIndex(op.uid);
        const n = idx.deleteByFilter(op.filter);
        idx.touch(now);
        return { providedIds: 0, deletedDocuments: n, originalFilter: JSON.stringify(op.filter) };
      }
      case "deleteAll": {
        const idx = this.getIndex(op.uid);
        const n = idx.deleteAll();
        idx.touch(now);
        return { deletedDocuments: n };
      }
      case "settings": {
        let idx = this.indexes.get(op.uid);
        if (!idx) {
          idx = new MeiliIndex(op.uid, null, now);
          this.indexes.set(op.uid, idx);
        }
        idx.updateSettings(op.payload);
        idx.touch(now);
        return details;
      }
      case "deleteTasks": {
        let matched = 0;
        let deleted = 0;
        for (const [uid, t] of this.tasks)
          if (taskMatches(t, op.query)) {
            matched++;
            if (t.status !== "enqueued" && t.status !== "processing") {
              this.tasks.delete(uid);
              deleted++;
            }
          }
        return { matchedTasks: matched, deletedTasks: deleted, originalFilter: op.originalFilter };
      }
    }
  }

  // -------------------------------------------------------------------------------------
  // persistence

  private journal(entry: { task: Task; op?: Op }) {
    if (this.journalFd === null) return;
    const line = `${JSON.stringify(entry)}\n`;
    fs.writeSync(this.journalFd, line);
    fs.fdatasyncSync(this.journalFd);
    this.journalBytes += Buffer.byteLength(line);
    if (this.journalBytes > JOURNAL_COMPACT_BYTES) this.snapshot();
  }

  private load(dir: string) {
    fs.mkdirSync(dir, { recursive: true });
    const snap = path.join(dir, "snapshot.ndjson");
    const jour = path.join(dir, "journal.ndjson");
    if (fs.existsSync(snap)) {
      let pending: { uid: string; docs: Doc[] } | null = null;
      const flush = () => {
        if (pending?.docs.length) this.indexes.get(pending.uid)!.addDocuments(pending.docs, {});
        if (pending) pending.docs = [];
      };
      for (const line of readLines(snap)) {
        const rec = JSON.parse(line);
        if (rec.type === "meta") {
          this.nextTaskUid = rec.nextTaskUid;
          this.nextBatchUid = rec.nextBatchUid ?? rec.nextTaskUid;
        } else if (rec.type === "index") {
          flush();
          const idx = new MeiliIndex(rec.uid, rec.primaryKey, rec.createdAt);
          idx.updateSettings(rec.settings as Partial<Settings>);
          idx.updatedAt = rec.updatedAt;
          this.indexes.set(rec.uid, idx);
          pending = { uid: rec.uid, docs: [] };
        } else if (rec.type === "doc") {
          pending!.docs.push(rec.doc);
          if (pending!.docs.length >= 1000) flush();
        } else if (rec.type === "task") {
          this.tasks.set(rec.task.uid, rec.task);
        }
      }
      flush();
    }
    if (fs.existsSync(jour)) {
      for (const line of readLines(jour)) {
        let entry: { task: Task; op?: Op };
        try {
          entry = JSON.parse(line);
        } catch {
          break; // a torn last line: that task never reported success
        }
        if (entry.op) {
          try {
            this.apply(entry.op, entry.task.startedAt ?? entry.task.enqueuedAt, entry.task.details);
          } catch (e) {
            console.error(`[meili-fake] replaying task ${entry.task.uid} failed: ${(e as Error).message}`);
          }
        }
        this.tasks.set(entry.task.uid, entry.task);
        this.nextTaskUid = Math.max(this.nextTaskUid, entry.task.uid + 1);
        if (entry.task.batchUid != null) this.nextBatchUid = Math.max(this.nextBatchUid, entry.task.batchUid + 1);
        this.lastUpdate = entry.task.finishedAt;
      }
    }
    this.trimTasks();
    // tasks that were enqueued or processing when the process died never happened
    for (const t of this.tasks.values())
      if (t.status === "enqueued" || t.status === "processing") {
        t.status = "failed";
        t.error = new MeiliError(500, "internal", "The search fake stopped before this task was processed.", "internal").toJSON();
      }
    this.snapshot();
  }

  /** Writes a full snapshot (atomically) and empties the journal. */
  snapshot() {
    if (!this.dataDir) return;
    const dir = this.dataDir;
    const snap = path.join(dir, "snapshot.ndjson");
    const tmp = `${snap}.tmp`;
    const fd = fs.openSync(tmp, "w");
    const w = (o: unknown) => fs.writeSync(fd, `${JSON.stringify(o)}\n`);
    w({ type: "meta", version: 1, nextTaskUid: this.nextTaskUid, nextBatchUid: this.nextBatchUid });
    for (const idx of this.indexes.values()) {
      w({
        type: "index",
        uid: idx.uid,
        primaryKey: idx.primaryKey,
        createdAt: idx.createdAt,
        updatedAt: idx.updatedAt,
        settings: idx.settings,
      });
      let buf = "";
      for (const doc of idx.documents()) {
        buf += `${JSON.stringify({ type: "doc", doc })}\n`;
        if (buf.length > 1 << 20) {
          fs.writeSync(fd, buf);
          buf = "";
        }
      }
      if (buf) fs.writeSync(fd, buf);
    }
    for (const t of this.tasks.values()) if (t.status !== "enqueued" && t.status !== "processing") w({ type: "task", task: t });
    fs.fsyncSync(fd);
    fs.closeSync(fd);
    fs.renameSync(tmp, snap);
    const dfd = fs.openSync(dir, "r");
    fs.fsyncSync(dfd);
    fs.closeSync(dfd);
    if (this.journalFd !== null) fs.closeSync(this.journalFd);
    this.journalFd = fs.openSync(path.join(dir, "journal.ndjson"), "w");
    fs.fsyncSync(this.journalFd);
    this.journalBytes = 0;
  }

  /** Finishes the queued tasks, then writes a snapshot. */
  async close() {
    await this.drain();
    if (this.dataDir) this.snapshot();
    if (this.journalFd !== null) {
      fs.closeSync(this.journalFd);
      this.journalFd = null;
    }
  }
}

function* readLines(file: string): Generator<string> {
  const text = fs.readFileSync(file, "utf8");
  let start = 0;
  for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", start)) {
    const line = text.slice(start, i);
    start = i + 1;
    if (line) yield line;
  }
  const rest = text.slice(start);
  if (rest) yield rest;
}

function failedDetails(op: Op, details: Record<string, unknown> | null) {
  if (!details) return details;
  const d = { ...details };
  if ("indexedDocuments" in d) d.indexedDocuments = 0;
  if ("deletedDocuments" in d) d.deletedDocuments = 0;
  if (op.kind === "deleteTasks") d.deletedTasks = 0;
  return d;
}

const within = (v: string | null, after?: string, before?: string) =>
  (!after || (v !== null && v > new Date(after).toISOString())) && (!before || (v !== null && v < new Date(before).toISOString()));

export function taskMatches(t: Task, q: TaskQuery): boolean {
  if (q.uids && !q.uids.includes(t.uid)) return false;
  if (q.batchUids && (t.batchUid === null || !q.batchUids.includes(t.batchUid))) return false;
  if (q.canceledBy && (t.canceledBy === null || !q.canceledBy.includes(t.canceledBy))) return false;
  if (q.statuses && !q.statuses.includes(t.status)) return false;
  if (q.types && !q.types.includes(t.type)) return false;
  if (q.indexUids && (t.indexUid === null || !q.indexUids.includes(t.indexUid))) return false;
  if (!within(t.enqueuedAt, q.afterEnqueuedAt, q.beforeEnqueuedAt)) return false;
  if (!within(t.startedAt, q.afterStartedAt, q.beforeStartedAt)) return false;
  if (!within(t.finishedAt, q.afterFinishedAt, q.beforeFinishedAt)) return false;
  return true;
}

const STATUSES = ["enqueued", "processing", "succeeded", "failed", "canceled"];
const TYPES = [
  "documentAdditionOrUpdate",
  "documentEdition",
  "documentDeletion",
  "settingsUpdate",
  "indexCreation",
  "indexDeletion",
  "indexUpdate",
  "indexSwap",
  "taskCancelation",
  "taskDeletion",
  "dumpCreation",
  "snapshotCreation",
];

/** Parses the task filter query parameters (`?statuses=failed&indexUids=a,b`). */
export function parseTaskQuery(params: URLSearchParams, allowPaging: boolean) {
  const q: TaskQuery & { limit?: number; from?: number; reverse?: boolean } = {};
  const list = (name: string) => {
    const v = params.get(name);
    if (v === null || v === "*") return undefined;
    return v
      .split(",")
      .map((x) => x.trim())
      .filter(Boolean);
  };
  const nums = (name: string) =>
    list(name)?.map((x) => {
      const n = Number(x);
      if (!Number.isInteger(n) || n < 0)
        throw bad(
          `invalid_task_${name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`,
          `Invalid value in parameter \`${name}\`: could not parse \`${x}\` as a positive integer`,
        );
      return n;
    });
  q.uids = nums("uids");
  q.batchUids = nums("batchUids");
  q.canceledBy = nums("canceledBy");
  q.statuses = list("statuses");
  for (const s of q.statuses ?? [])
    if (!STATUSES.includes(s))
      throw bad(
        "invalid_task_statuses",
        `Invalid value in parameter \`statuses\`: \`${s}\` is not a valid task status. Available statuses are ${STATUSES.map((x) => `\`${x}\``).join(", ")}.`,
      );
  q.types = list("types");
  for (const s of q.types ?? [])
    if (!TYPES.includes(s))
      throw bad(
        "invalid_task_types",
        `Invalid value in parameter \`types\`: \`${s}\` is not a valid task type. Available types are ${TYPES.map((x) => `\`${x}\``).join(", ")}.`,
      );
  q.indexUids = list("indexUids");
  for (const k of [
    "afterEnqueuedAt",
    "beforeEnqueuedAt",
    "afterStartedAt",
    "beforeStartedAt",
    "afterFinishedAt",
    "beforeFinishedAt",
  ] as const) {
    const v = params.get(k);
    if (v && v !== "*") {
      if (Number.isNaN(Date.parse(v)))
        throw bad(
          `invalid_task_${k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`,
          `Invalid value in parameter \`${k}\`: \`${v}\` is an invalid date-time.`,
        );
      q[k] = v;
    }
  }
  if (allowPaging) {
    const limit = params.get("limit");
    if (limit !== null) {
      const n = Number(limit);
      if (!Number.isInteger(n) || n < 0)
        throw bad("invalid_task_limit", `Invalid value in parameter \`limit\`: could not parse \`${limit}\` as a positive integer`);
      q.limit = n;
    }
    const from = params.get("from");
    if (from !== null) {
      const n = Number(from);
      if (!Number.isInteger(n) || n < 0)
        throw bad("invalid_task_from", `Invalid value in parameter \`from\`: could not parse \`${from}\` as a positive integer`);
      q.from = n;
    }
    const rev = params.get("reverse");
    if (rev !== null) q.reverse = rev === "true";
  }
  for (const k of Object.keys(q) as (keyof typeof q)[]) if (q[k] === undefined) delete q[k];
  return q;
}
