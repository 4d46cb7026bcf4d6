import { AsyncLocalStorage } from "node:async_hooks";

/**
 * Per-request memo: the root middleware runs every loader and action of one request inside
 * `requestStore.run(new Map(), …)`, so work such as validating the session happens once per
 * request even though React Router hands each loader its own Request object.
 */
export const requestStore = new AsyncLocalStorage<Map<string, unknown>>();

export function memoForRequest<T>(key: string, compute: () => T): T {
  const store = requestStore.getStore();
  if (!store) return compute();
  if (store.has(key)) return store.get(key) as T;
  const value = compute();
  store.set(key, value);
  return value;
}
