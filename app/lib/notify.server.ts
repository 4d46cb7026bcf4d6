/**
 * One LISTEN connection per process, for the in-process caches that must forget what they hold
 * when PostgreSQL reports a change (triggers of migrations 0008–0010 and 0012; docs/decisions/006).
 *
 * While the connection is down (or not yet up) `listening()` is false and the caches neither
 * serve nor store. Every drop and every (re)connect calls the reset handlers, since
 * notifications may have been missed in between.
 */
import pg from "pg";
import { env } from "./env.server";

/** Changes to what the read page shows (people, procedures and their rows, recording titles, marks that point at a procedure, test records). */
export const CONTENT_CHANNEL = "benchreel_content";
/** Sign-ins, sign-outs, session extensions and ends. */
export const SESSIONS_CHANNEL = "benchreel_sessions";
const CHANNELS = [CONTENT_CHANNEL, SESSIONS_CHANNEL];

type Handler = () => void;
const handlers = new Map<string, Set<Handler>>();
const resets = new Set<Handler>();

let up = false;
let starting = false;
let client: pg.Client | null = null;
let retryMs = 250;

export function onNotify(channel: string, fn: Handler) {
  if (!handlers.has(channel)) handlers.set(channel, new Set());
  handlers.get(channel)!.add(fn);
}

/** Called whenever the connection drops or (re)connects. */
export function onListenerReset(fn: Handler) {
  resets.add(fn);
}

const reset = () => resets.forEach((fn) => fn());

/** True while changes are being heard; starts the connection on first use. */
export function listening(): boolean {
  if (!up && !starting && env().CHANGE_LISTENER !== "off") {
    starting = true;
    void connect();
  }
  return up;
}

async function connect() {
  const c = new pg.Client({ connectionString: env().DATABASE_URL, application_name: "benchreel-listener", keepAlive: true });
  const down = () => {
    if (client !== c) return;
    client = null;
    up = false;
    reset();
    c.removeAllListeners("notification");
    void c.end().catch(() => {});
    setTimeout(() => listening(), retryMs).unref();
    retryMs = Math.min(retryMs * 2, 10_000);
  };
  c.on("error", down);
  c.on("end", down);
  c.on("notification", (n) => handlers.get(n.channel)?.forEach((fn) => fn()));
  client = c;
  try {
    await c.connect();
    for (const ch of CHANNELS) await c.query(`LISTEN ${ch}`);
    reset(); // anything may have changed while nobody listened
    up = true;
    retryMs = 250;
    heartbeat(c, down);
  } catch {
    down();
  } finally {
    starting = false;
  }
}

/**
 * A connection can go quiet without closing (a half-open socket, a network partition): ask it
 * something every 15 s and count it down when the answer takes over 5 s. The caches also expire
 * their entries (page-cache.server.ts), which bounds the damage in between.
 */
function heartbeat(c: pg.Client, down: () => void) {
  const timer = setInterval(() => {
    if (client !== c) return clearInterval(timer);
    const late = setTimeout(down, 5_000);
    c.query("select 1").then(
      () => clearTimeout(late),
      () => {
        clearTimeout(late);
        down();
      },
    );
  }, 15_000);
  timer.unref();
}
