/**
 * The run screen's outbox on the device: every entry is written here first (IndexedDB, through
 * idb-keyval) and leaves only when the server has answered for it, so a dropped connection, a
 * reload or a tablet that sleeps loses nothing. Each entry carries its own idempotency key: a
 * batch sent twice (the answer lost on the way back) is stored once on the server.
 */
import { createStore, get, set, type UseStore } from "idb-keyval";
import type { EntryInput } from "~/lib/runs/entries";

export type QueuedEntry = EntryInput & { refused?: string };

let store: UseStore | null = null;
const db = () => {
  store ??= createStore("benchreel-runs", "waiting-entries");
  return store;
};
const keyOf = (runId: string) => `run:${runId}`;

export async function waitingEntries(runId: string): Promise<QueuedEntry[]> {
  return (await get<QueuedEntry[]>(keyOf(runId), db())) ?? [];
}

export async function addWaiting(runId: string, entry: QueuedEntry): Promise<QueuedEntry[]> {
  const list = [...(await waitingEntries(runId)), entry];
  await set(keyOf(runId), list, db());
  return list;
}

/** Takes the entries the server answered for out of the queue (others may have been added meanwhile). */
export async function removeWaiting(runId: string, keys: Set<string>): Promise<QueuedEntry[]> {
  const list = (await waitingEntries(runId)).filter((e) => !keys.has(e.key));
  await set(keyOf(runId), list, db());
  return list;
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
