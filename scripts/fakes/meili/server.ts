/**
 * A local stand-in for a Meilisearch server: the part of its HTTP API that the `meilisearch`
 * JS SDK uses for indexes, settings, documents, search and tasks, served on loopback with
 * node:http and backed by the in-memory engine in engine.ts (minisearch's radix tree for the
 * term dictionary). See README.md beside this file for what is and is not implemented.
 *
 *   import { startMeiliFake } from "./scripts/fakes/meili/server";
 *   const fake = await startMeiliFake({ port: 0, dataDir: ".data/meili", masterKey: "k" });
 *
 *   tsx scripts/fakes/meili/server.ts --port 7701 --data .data/meili [--key KEY] [--host 127.0.0.1]
 */
import http from "node:http";
import type { AddressInfo } from "node:net";
import { bad, invalidType, MeiliError } from "./errors";
import { checkSearchParams, type SearchParams } from "./engine";
import { FilterSyntaxError, FilterTypeError, parseFilterParam } from "./filter";
import { checkSettingsPayload, defaultSettings, SETTING_ROUTES, type Settings } from "./settings";
import { parseTaskQuery, Store, type Op, type TaskType } from "./store";

export const FAKE_VERSION = "1.22.0";
const MAX_PAYLOAD = 100 * 1024 * 1024;
const INDEX_UID_RE = /^[a-zA-Z0-9_-]{1,400}$/;

export type MeiliFakeOptions = {
  port: number;
  host?: string;
  dataDir?: string;
  masterKey?: string;
  /** Keeps each task in `processing` this long (for tests of the task lifecycle). */
  processingDelayMs?: number;
};

export type MeiliFake = { url: string; port: number; store: Store; close(): Promise<void> };

type Req = { method: string; path: string; params: URLSearchParams; headers: http.IncomingHttpHeaders; body: Buffer };
type Res = { status: number; body?: unknown };

const json = (status: number, body?: unknown): Res => ({ status, body });

function readBody(req: http.IncomingMessage): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on("data", (c: Buffer) => {
      size += c.length;
      if (size > MAX_PAYLOAD) {
        reject(
          new MeiliError(
            413,
            "payload_too_large",
            "The provided payload reached the size limit. The maximum accepted payload size is 100 MiB.",
          ),
        );
        req.destroy();
        return;
      }
      chunks.push(c);
    });
    req.on("end", () => resolve(Buffer.concat(chunks)));
    req.on("error", reject);
  });
}

function parseJson(body: Buffer, required = true): unknown {
  const text = body.toString("utf8");
  if (text.trim() === "") {
    if (required) throw bad("missing_payload", "A json payload is missing.");
    return undefined;
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw bad("malformed_payload", `The json payload provided is malformed. \`${(e as Error).message}\`.`);
  }
}

function checkUid(uid: string) {
  if (!INDEX_UID_RE.test(uid))
    throw bad(
      "invalid_index_uid",
      `\`${uid}\` is not a valid index uid. Index uid can be an integer or a string containing only alphanumeric characters, hyphens (-) and underscores (_), and can not be more than 400 bytes.`,
    );
  return uid;
}

function intParam(params: URLSearchParams, name: string, code: string): number | undefined {
  const v = params.get(name);
  if (v === null) return undefined;
  const n = Number(v);
  if (!/^\d+$/.test(v) || !Number.isSafeInteger(n))
    throw bad(code, `Invalid value in parameter \`${name}\`: could not parse \`${v}\` as a positive integer`);
  return n;
}

const listParam = (params: URLSearchParams, name: string) => {
  const v = params.get(name);
  return v === null
    ? undefined
    : v
        .split(",")
        .map((s) => s.trim())
        .filter(Boolean);
};

function boolParam(params: URLSearchParams, name: string, code: string): boolean | undefined {
  const v = params.get(name);
  if (v === null) return undefined;
  if (v !== "true" && v !== "false")
    throw bad(code, `Invalid value in parameter \`${name}\`: could not parse \`${v}\` as a boolean, expected either \`true\` or \`false\``);
  return v === "true";
}

/** GET /indexes/:uid/search query parameters → a search body. */
function searchParamsFromQuery(p: URLSearchParams): SearchParams {
  const out: Record<string, unknown> = {};
  for (const k of ["q", "filter", "highlightPreTag", "highlightPostTag", "cropMarker", "matchingStrategy", "distinct"]) {
    const v = p.get(k);
    if (v !== null) out[k] = v;
  }
  for (const k of ["offset", "limit", "page", "hitsPerPage", "cropLength"]) {
    const v = intParam(p, k, `invalid_search_${k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`);
    if (v !== undefined) out[k] = v;
  }
  for (const k of ["sort", "facets", "attributesToRetrieve", "attributesToHighlight", "attributesToCrop", "attributesToSearchOn"]) {
    const v = listParam(p, k);
    if (v !== undefined) out[k] = v;
  }
  for (const k of ["showMatchesPosition", "showRankingScore", "showRankingScoreDetails", "retrieveVectors", "showPerformanceDetails"]) {
    const v = boolParam(p, k, `invalid_search_${k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`);
    if (v !== undefined) out[k] = v;
  }
  const th = p.get("rankingScoreThreshold");
  if (th !== null) out.rankingScoreThreshold = Number(th);
  return out as SearchParams;
}

function documentsPayload(req: Req): Record<string, unknown>[] {
  const ct = String(req.headers["content-type"] ?? "application/json")
    .split(";")[0]
    .trim()
    .toLowerCase();
  const text = req.body.toString("utf8");
  if (text.trim() === "") throw bad("missing_payload", `A ${ct === "application/x-ndjson" ? "ndjson" : "json"} payload is missing.`);
  let docs: unknown;
  if (ct === "application/json") {
    try {
      docs = JSON.parse(text);
    } catch (e) {
      throw bad(
        "malformed_payload",
        `The \`json\` payload provided is malformed. \`Couldn't serialize document value: ${(e as Error).message}\`.`,
      );
    }
    if (!Array.isArray(docs)) docs = [docs];
  } else if (ct === "application/x-ndjson") {
    try {
      docs = text
        .split("\n")
        .filter((l) => l.trim())
        .map((l) => JSON.parse(l));
    } catch (e) {
      throw bad(
        "malformed_payload",
        `The \`ndjson\` payload provided is malformed. \`Couldn't serialize document value: ${(e as Error).message}\`.`,
      );
    }
  } else {
    throw new MeiliError(
      415,
      "invalid_content_type",
      `The Content-Type \`${ct}\` is invalid. Accepted values for the Content-Type header are: \`application/json\`, \`application/x-ndjson\` (text/csv is not implemented by the Benchreel search fake).`,
    );
  }
  for (const d of docs as unknown[])
    if (!d || typeof d !== "object" || Array.isArray(d))
      throw bad(
        "malformed_payload",
        "The `json` payload provided is malformed. `Couldn't serialize document value: data are neither an object nor a list of objects`.",
      );
  return docs as Record<string, unknown>[];
}

function checkFilterSyntax(filter: unknown, code: string) {
  try {
    parseFilterParam(filter);
  } catch (e) {
    if (e instanceof FilterSyntaxError || e instanceof FilterTypeError) throw bad(code, e.message);
    throw e;
  }
}

/** Routes one request. */
function route(store: Store, req: Req): Res {
  const { method, path, params } = req;
  const seg = path.split("/").filter(Boolean).map(decodeURIComponent);
  const accepted = (type: TaskType, indexUid: string | null, details: Record<string, unknown> | null, op: Op) =>
    json(202, store.enqueue(type, indexUid, details, op, params.get("customMetadata") ?? undefined));
  const notAllowed = () => json(405);

  if (seg.length === 1 && seg[0] === "health") return method === "GET" ? json(200, { status: "available" }) : notAllowed();
  if (seg.length === 1 && seg[0] === "version")
    return method === "GET"
      ? json(200, { commitSha: "benchreel-search-fake", commitDate: "2026-01-01T00:00:00Z", pkgVersion: FAKE_VERSION })
      : notAllowed();
  if (seg.length === 1 && seg[0] === "stats") {
    if (method !== "GET") return notAllowed();
    const indexes: Record<string, unknown> = {};
    for (const [uid, idx] of store.indexes) indexes[uid] = idx.stats(store.isIndexing(uid));
    return json(200, { databaseSize: 0, usedDatabaseSize: 0, lastUpdate: store.lastUpdate, indexes });
  }

  if (seg[0] === "tasks") {
    if (seg.length === 1 && method === "GET") return json(200, store.listTasks(parseTaskQuery(params, true)));
    if (seg.length === 1 && method === "DELETE") {
      const query = parseTaskQuery(params, false);
      if (Object.keys(query).length === 0 && ![...params.keys()].length)
        throw bad(
          "missing_task_filters",
          "Query parameters to filter the tasks to delete are missing. Available query parameters are: `uids`, `indexUids`, `statuses`, `types`, `canceledBy`, `beforeEnqueuedAt`, `afterEnqueuedAt`, `beforeStartedAt`, `afterStartedAt`, `beforeFinishedAt`, `afterFinishedAt`.",
        );
      const originalFilter = `?${params.toString()}`;
      return accepted(
        "taskDeletion",
        null,
        { matchedTasks: null, deletedTasks: null, originalFilter },
        { kind: "deleteTasks", query, originalFilter },
      );
    }
    if (seg.length === 2 && seg[1] === "cancel") {
      if (method !== "POST") return notAllowed();
      const query = parseTaskQuery(params, false);
      if (Object.keys(query).length === 0 && ![...params.keys()].length)
        throw bad(
          "missing_task_filters",
          "Query parameters to filter the tasks to cancel are missing. Available query parameters are: `uids`, `indexUids`, `statuses`, `types`, `canceledBy`, `beforeEnqueuedAt`, `afterEnqueuedAt`, `beforeStartedAt`, `afterStartedAt`, `beforeFinishedAt`, `afterFinishedAt`.",
        );
      return json(202, store.cancel(query, `?${params.toString()}`, params.get("customMetadata") ?? undefined));
    }
    if (seg.length === 2 && method === "GET") {
      if (!/^\d+$/.test(seg[1]))
        throw bad("invalid_task_uids", `Invalid value in parameter \`taskUid\`: could not parse \`${seg[1]}\` as a positive integer`);
      return json(200, store.getTask(Number(seg[1])));
    }
    return notAllowed();
  }

  if (seg.length === 1 && seg[0] === "multi-search") {
    if (method !== "POST") return notAllowed();
    const body = parseJson(req.body) as { queries?: unknown; federation?: unknown };
    if (body && typeof body === "object" && body.federation != null)
      throw bad("bad_request", "Federated multi-search is not implemented by the Benchreel search fake.");
    if (!body || !Array.isArray(body.queries)) throw invalidType("invalid_multi_search_queries", "queries", "an array", body?.queries);
    const results = body.queries.map((raw, i) => {
      try {
        const { indexUid, ...rest } = (raw ?? {}) as { indexUid?: string };
        if (typeof indexUid !== "string") throw bad("missing_index_uid", "Missing field `indexUid`");
        const p = checkSearchParams(rest);
        return { indexUid, ...store.getIndex(checkUid(indexUid)).search(p) };
      } catch (e) {
        if (e instanceof MeiliError) throw new MeiliError(e.status, e.code, `Inside \`.queries[${i}]\`: ${e.message}`, e.type);
        throw e;
      }
    });
    return json(200, { results });
  }

  if (seg.length === 1 && seg[0] === "swap-indexes") {
    if (method !== "POST") return notAllowed();
    const body = parseJson(req.body);
    if (!Array.isArray(body)) throw invalidType("bad_request", "", "an array", body);
    const swaps = body.map((s, i) => {
      const pair = (s as { indexes?: unknown })?.indexes;
      if (!Array.isArray(pair) || pair.length !== 2 || !pair.every((x) => typeof x === "string"))
        throw bad("invalid_swap_indexes", `Invalid value at \`[${i}].indexes\`: Expected an array of two index uids.`);
      pair.forEach(checkUid);
      return { indexes: pair as [string, string], rename: Boolean((s as { rename?: boolean }).rename) };
    });
    return accepted("indexSwap", null, { swaps }, { kind: "swapIndexes", swaps });
  }

  if (seg[0] !== "indexes") return notFound(method, path);

  // /indexes
  if (seg.length === 1) {
    if (method === "GET") {
      const offset = intParam(params, "offset", "invalid_index_offset") ?? 0;
      const limit = intParam(params, "limit", "invalid_index_limit") ?? 20;
      const all = [...store.indexes.values()].sort((a, b) => (a.uid < b.uid ? -1 : 1));
      return json(200, { results: all.slice(offset, offset + limit).map((i) => i.info()), offset, limit, total: all.length });
    }
    if (method === "POST") {
      const body = parseJson(req.body) as { uid?: unknown; primaryKey?: unknown };
      if (!body || typeof body !== "object") throw invalidType("bad_request", "", "an object", body);
      if (body.uid === undefined) throw bad("missing_index_uid", "Missing field `uid`");
      if (typeof body.uid !== "string") throw invalidType("invalid_index_uid", "uid", "a string", body.uid);
      const pk = body.primaryKey ?? null;
      if (pk !== null && typeof pk !== "string") throw invalidType("invalid_index_primary_key", "primaryKey", "a string", pk);
      const uid = checkUid(body.uid);
      return accepted("indexCreation", uid, { primaryKey: pk }, { kind: "createIndex", uid, primaryKey: pk as string | null });
    }
    return notAllowed();
  }

  const uid = checkUid(seg[1]);

  // /indexes/:uid
  if (seg.length === 2) {
    if (method === "GET") return json(200, store.getIndex(uid).info());
    if (method === "PATCH") {
      const body = (parseJson(req.body, false) ?? {}) as { primaryKey?: unknown; uid?: unknown };
      if (body.uid !== undefined && body.uid !== uid)
        throw bad("bad_request", "Renaming an index is not implemented by the Benchreel search fake.");
      const pk = body.primaryKey ?? null;
      if (pk !== null && typeof pk !== "string") throw invalidType("invalid_index_primary_key", "primaryKey", "a string", pk);
      return accepted("indexUpdate", uid, { primaryKey: pk }, { kind: "updateIndex", uid, primaryKey: pk as string | null });
    }
    if (method === "DELETE") return accepted("indexDeletion", uid, { deletedDocuments: null }, { kind: "deleteIndex", uid });
    return notAllowed();
  }

  const sub = seg[2];

  if (sub === "stats" && seg.length === 3)
    return method === "GET" ? json(200, store.getIndex(uid).stats(store.isIndexing(uid))) : notAllowed();

  if (sub === "search" && seg.length === 3) {
    if (method === "POST") {
      const body = parseJson(req.body, false) ?? {};
      return json(200, store.getIndex(uid).search(checkSearchParams(body)));
    }
    if (method === "GET") return json(200, store.getIndex(uid).search(checkSearchParams(searchParamsFromQuery(params))));
    return notAllowed();
  }

  if (sub === "facet-search" && seg.length === 3) {
    if (method !== "POST") return notAllowed();
    const body = parseJson(req.body) as Parameters<ReturnType<Store["getIndex"]>["facetSearch"]>[0];
    return json(200, store.getIndex(uid).facetSearch(body));
  }

  if (sub === "settings") {
    if (seg.length === 3) {
      if (method === "GET") return json(200, store.getIndex(uid).settings);
      if (method === "PATCH") {
        const payload = checkSettingsPayload(parseJson(req.body));
        return accepted("settingsUpdate", uid, payload, { kind: "settings", uid, payload });
      }
      if (method === "DELETE") {
        const payload = Object.fromEntries(Object.keys(defaultSettings()).map((k) => [k, null]));
        return accepted("settingsUpdate", uid, payload, { kind: "settings", uid, payload });
      }
      return notAllowed();
    }
    const key = SETTING_ROUTES[seg[3]];
    if (!key || seg.length !== 4) return notFound(method, path);
    if (method === "GET") return json(200, store.getIndex(uid).settings[key as keyof Settings]);
    if (method === "PUT" || method === "PATCH" || method === "POST") {
      const payload = checkSettingsPayload({ [key]: parseJson(req.body) });
      return accepted("settingsUpdate", uid, payload, { kind: "settings", uid, payload });
    }
    if (method === "DELETE") {
      const payload = { [key]: null };
      return accepted("settingsUpdate", uid, payload, { kind: "settings", uid, payload });
    }
    return notAllowed();
  }

  if (sub === "documents") {
    if (seg.length === 3) {
      if (method === "GET") {
        const idx = store.getIndex(uid);
        const filter = params.get("filter") ?? undefined;
        checkFilterSyntax(filter, "invalid_document_filter");
        return json(
          200,
          idx.getDocuments({
            offset: intParam(params, "offset", "invalid_document_offset"),
            limit: intParam(params, "limit", "invalid_document_limit"),
            fields: listParam(params, "fields"),
            ids: listParam(params, "ids"),
            sort: listParam(params, "sort"),
            filter,
          }),
        );
      }
      if (method === "POST" || method === "PUT") {
        const docs = documentsPayload(req);
        const primaryKey = params.get("primaryKey");
        return accepted(
          "documentAdditionOrUpdate",
          uid,
          { receivedDocuments: docs.length, indexedDocuments: null },
          { kind: "addDocuments", uid, docs, primaryKey, update: method === "PUT" },
        );
      }
      if (method === "DELETE")
        return accepted(
          "documentDeletion",
          uid,
          { providedIds: 0, deletedDocuments: null, originalFilter: null },
          { kind: "deleteAll", uid },
        );
      return notAllowed();
    }
    const action = seg[3];
    if (seg.length === 4 && action === "fetch" && method === "POST") {
      const body = (parseJson(req.body, false) ?? {}) as Record<string, unknown>;
      const idx = store.getIndex(uid);
      checkFilterSyntax(body.filter, "invalid_document_filter");
      for (const k of ["offset", "limit"] as const)
        if (body[k] !== undefined && !(typeof body[k] === "number" && Number.isInteger(body[k]) && (body[k] as number) >= 0))
          throw invalidType(`invalid_document_${k}`, k, "a positive integer", body[k]);
      return json(
        200,
        idx.getDocuments({
          offset: body.offset as number | undefined,
          limit: body.limit as number | undefined,
          fields: body.fields as string[] | undefined,
          filter: body.filter,
          ids: body.ids as string[] | undefined,
          sort: body.sort as string[] | undefined,
        }),
      );
    }
    if (seg.length === 4 && action === "delete-batch" && method === "POST") {
      const ids = parseJson(req.body);
      if (!Array.isArray(ids) || !ids.every((x) => typeof x === "string" || typeof x === "number"))
        throw invalidType("invalid_document_ids", "", "an array of document ids", ids);
      return accepted("documentDeletion", uid, { providedIds: ids.length, deletedDocuments: null }, { kind: "deleteDocuments", uid, ids });
    }
    if (seg.length === 4 && action === "delete" && method === "POST") {
      const body = parseJson(req.body) as { filter?: unknown };
      if (!body || typeof body !== "object" || body.filter === undefined) throw bad("missing_document_filter", "Missing field `filter`");
      checkFilterSyntax(body.filter, "invalid_document_filter");
      return accepted(
        "documentDeletion",
        uid,
        { providedIds: 0, deletedDocuments: null, originalFilter: JSON.stringify(body.filter) },
        { kind: "deleteByFilter", uid, filter: body.filter },
      );
    }
    if (seg.length === 4) {
      const id = action;
      if (method === "GET") return json(200, store.getIndex(uid).getDocument(id, listParam(params, "fields")));
      if (method === "DELETE")
        return accepted("documentDeletion", uid, { providedIds: 1, deletedDocuments: null }, { kind: "deleteDocuments", uid, ids: [id] });
      return notAllowed();
    }
  }
  return notFound(method, path);
}

function notFound(method: string, path: string): Res {
  throw new MeiliError(404, "not_found", `The route \`${method} ${path}\` is not implemented by the Benchreel search fake.`);
}

function checkAuth(masterKey: string | undefined, req: Req) {
  if (!masterKey || req.path === "/health") return;
  const h = req.headers.authorization;
  if (!h)
    throw new MeiliError(
      401,
      "missing_authorization_header",
      "The Authorization header is missing. It must use the bearer authorization method.",
      "auth",
    );
  const m = /^Bearer\s+(.+)$/.exec(h);
  if (!m || m[1].trim() !== masterKey) throw new MeiliError(403, "invalid_api_key", "The provided API key is invalid.", "auth");
}

export async function startMeiliFake(opts: MeiliFakeOptions): Promise<MeiliFake> {
  const host = opts.host ?? "127.0.0.1";
  const store = Store.open({ dataDir: opts.dataDir, processingDelayMs: opts.processingDelayMs });
  const server = http.createServer(async (hreq, hres) => {
    const send = (status: number, body?: unknown) => {
      if (body === undefined || status === 204) {
        hres.writeHead(status);
        hres.end();
        return;
      }
      const text = JSON.stringify(body);
      hres.writeHead(status, { "content-type": "application/json", "content-length": Buffer.byteLength(text) });
      hres.end(text);
    };
    try {
      const url = new URL(hreq.url ?? "/", "http://localhost");
      const req: Req = {
        method: hreq.method ?? "GET",
        path: url.pathname.replace(/\/+$/, "") || "/",
        params: url.searchParams,
        headers: hreq.headers,
        body: Buffer.alloc(0),
      };
      checkAuth(opts.masterKey, req);
      req.body = await readBody(hreq);
      const r = route(store, req);
      send(r.status, r.body);
    } catch (e) {
      if (e instanceof MeiliError) send(e.status, e.toJSON());
      else {
        console.error("[meili-fake]", e);
        send(500, new MeiliError(500, "internal", String((e as Error)?.message ?? e), "internal").toJSON());
      }
    }
  });
  server.keepAliveTimeout = 5_000;
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, host, () => resolve());
  });
  const port = (server.address() as AddressInfo).port;
  let closing: Promise<void> | null = null;
  return {
    url: `http://${host}:${port}`,
    port,
    store,
    close() {
      closing ??= (async () => {
        await new Promise<void>((r) => {
          server.close(() => r());
          server.closeAllConnections();
        });
        await store.close();
      })();
      return closing;
    },
  };
}

// CLI: tsx scripts/fakes/meili/server.ts --port 7701 --data .data/meili [--key KEY] [--host H]
if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, fallback?: string) => {
    const i = process.argv.indexOf(`--${name}`);
    return i >= 0 ? process.argv[i + 1] : fallback;
  };
  const fake = await startMeiliFake({
    port: Number(arg("port", "7701")),
    host: arg("host", "127.0.0.1"),
    dataDir: arg("data"),
    masterKey: arg("key", process.env.MEILI_MASTER_KEY) || undefined,
  });
  console.log(`[meili-fake] listening on ${fake.url}${arg("data") ? ` (data in ${arg("data")})` : " (in memory)"}`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
}
