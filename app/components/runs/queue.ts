/**
 * The run screen's outbox on the device: every entry is written here first (IndexedDB, through
 * idb-keyval) and leaves only when the server has answered for it, so a dropped connection, a
 * reload or a tablet that sleeps loses nothing. Each entry carries its own idempotency key: a
 * batch sent twice (the answer lost on the way back) is stored once on the server. Photos wait
 * the same way, as Blobs in a store of their own, each with its key (sent once, like entries).
 */
import { createStore, get, type UseStore, update } from "idb-keyval";
import type { EntryInput, Place } from "~/lib/runs/entries";

export type QueuedEntry = EntryInput & { refused?: string };

let store: UseStore | null = null;
const db = () => {
  store ??= createStore("benchreel-runs", "waiting-entries");
  return store;
};
// A database of its own: idb-keyval's createStore opens one object store per database.
let photoStore: UseStore | null = null;
const photoDb = () => {
  photoStore ??= createStore("benchreel-run-photos", "waiting-photos");
  return photoStore;
};
const keyOf = (runId: string) => `run:${runId}`;

/**
 * Changes a run's list in one IndexedDB transaction (idb-keyval's update). A read, then a write,
 * would lose an entry: two fields kept a moment apart, or a send's removal while a field is
 * kept, each read the same list and the later write drops the other's change.
 */
async function change<T>(runId: string, store: UseStore, fn: (list: T[]) => T[]): Promise<T[]> {
  let out: T[] = [];
  await update<T[]>(
    keyOf(runId),
    (old) => {
      out = fn(old ?? []);
      return out;
    },
    store,
  );
  return out;
}

export async function waitingEntries(runId: string): Promise<QueuedEntry[]> {
  return (await get<QueuedEntry[]>(keyOf(runId), db())) ?? [];
}

export function addWaiting(runId: string, entry: QueuedEntry): Promise<QueuedEntry[]> {
  return change<QueuedEntry>(runId, db(), (list) => [...list, entry]);
}

/** Takes the entries the server answered for out of the queue (others may have been added meanwhile). */
export function removeWaiting(runId: string, keys: Set<string>): Promise<QueuedEntry[]> {
  return change<QueuedEntry>(runId, db(), (list) => list.filter((e) => !keys.has(e.key)));
}

export type SendOutcome =
  | { kind: "sent"; keys: string[] }
  | { kind: "offline" }
  | { kind: "refused"; keys: string[]; reason: string; field?: string }
  | { kind: "closed"; reason: string };

/** Sends the waiting entries as one batch; network trouble leaves them waiting. */
export async function sendWaiting(runId: string, entries: QueuedEntry[]): Promise<SendOutcome> {
  if (!entries.length) return { kind: "sent", keys: [] };
  let res: Response;
  try {
    res = await fetch(`/api/runs/${runId}/entries`, {
      method: "POST",
      headers: { "Content-Type": "application/json" },
      body: JSON.stringify({ entries: entries.map(({ refused: _r, ...e }) => e) }),
    });
  } catch {
    return { kind: "offline" };
  }
  if (res.ok) return { kind: "sent", keys: entries.map((e) => e.key) };
  // A 5xx or a gateway's page: the server may come back; keep them.
  if (res.status >= 500 || res.status === 401 || res.status === 429) return { kind: "offline" };
  const body = (await res.json().catch(() => ({}))) as { reason?: string; issues?: { path: string; message: string }[] };
  const reason = body.reason ?? body.issues?.[0]?.message ?? "The server refused these entries.";
  if (res.status === 409 && /finished|abandoned|closed/i.test(reason)) return { kind: "closed", reason };
  return { kind: "refused", keys: entries.map((e) => e.key), reason, field: body.issues?.[0]?.path };
}

/** A photo taken on the run screen, kept on the device until the server has it. */
export type QueuedPhoto = {
  key: string;
  specKey: string;
  position: Place | null;
  blob: Blob;
  name: string;
  takenAt: string;
  refused?: string;
};

export async function waitingPhotos(runId: string): Promise<QueuedPhoto[]> {
  return (await get<QueuedPhoto[]>(keyOf(runId), photoDb())) ?? [];
}

export function addWaitingPhoto(runId: string, photo: QueuedPhoto): Promise<QueuedPhoto[]> {
  return change<QueuedPhoto>(runId, photoDb(), (list) => [...list, photo]);
}

/** Takes a photo out of the queue once the server answered for it, or marks it refused (kept, to be seen). */
export function settlePhoto(runId: string, key: string, refused?: string): Promise<QueuedPhoto[]> {
  return change<QueuedPhoto>(runId, photoDb(), (list) => list.flatMap((p) => (p.key !== key ? [p] : refused ? [{ ...p, refused }] : [])));
}

/**
 * Takes a photo off the device for good: one the server refused (too large, not a picture, the
 * run closed) would otherwise wait there for ever, since sending it again is refused again.
 */
export function discardPhoto(runId: string, key: string): Promise<QueuedPhoto[]> {
  return change<QueuedPhoto>(runId, photoDb(), (list) => list.filter((p) => p.key !== key));
}

/** Sends one waiting photo under its key (a resend after a lost answer is stored once). */
export async function sendPhoto(runId: string, p: QueuedPhoto): Promise<SendOutcome & { url?: string }> {
  const body = new FormData();
  body.set("specKey", p.specKey);
  body.set("key", p.key);
  for (const [field, n] of Object.entries(p.position ?? {})) if (n != null) body.set(field, String(n));
  body.set("photo", new File([p.blob], p.name, { type: p.blob.type }));
  let res: Response;
  try {
    res = await fetch(`/api/runs/${runId}/photos`, { method: "POST", body });
  } catch {
    return { kind: "offline" };
  }
  const out = (await res.json().catch(() => ({}))) as { url?: string; reason?: string; issues?: { message: string }[] };
  if (res.ok) return { kind: "sent", keys: [p.key], url: out.url };
  if (res.status >= 500 || res.status === 401 || res.status === 429) return { kind: "offline" };
  const reason = out.reason ?? out.issues?.[0]?.message ?? "The photo was refused.";
  if (res.status === 409 && /closed|finished|abandoned/i.test(reason)) return { kind: "closed", reason };
  return { kind: "refused", keys: [p.key], reason };
}
