import { hash, verify } from "@node-rs/argon2";
import { DrizzlePostgreSQLAdapter } from "@lucia-auth/adapter-drizzle";
import { sql } from "drizzle-orm";
import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser, type Session } from "lucia";
import { data, redirect } from "react-router";
import { sessions, users } from "~/db/schema";
import { db, isDatabaseDown, pool } from "./db.server";
import { env } from "./env.server";
import { can, forbiddenReason, type Permission, type Role } from "./permissions";
import { memoForRequest } from "./request-store.server";
import { clientAddress } from "./client-address.server";
import { accountKey, throttledPasswordCheck, type Refusal } from "./throttle.server";

const ARGON2 = { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, ARGON2);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

/**
 * lucia's Drizzle adapter, with the one query every request makes (session and person by the
 * cookie's id) as a named prepared statement: PostgreSQL plans it once per connection, and no
 * query is built per request.
 */
class SessionAdapter extends DrizzlePostgreSQLAdapter {
  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const { rows } = await pool().query<{
      id: string;
      user_id: string;
      expires_at: Date;
      email: string;
      name: string;
      role: Role;
      unit_system: "metric" | "inch";
      deactivated_at: Date | null;
    }>({
      name: "benchreel-session-and-user",
      text: `select s.id, s.user_id, s.expires_at, u.email, u.name, u.role, u.unit_system, u.deactivated_at
             from sessions s join users u on u.id = s.user_id where s.id = $1`,
      values: [sessionId],
    });
    const r = rows[0];
    if (!r) return [null, null];
    return [
      { id: r.id, userId: r.user_id, expiresAt: r.expires_at, attributes: {} },
      {
        id: r.user_id,
        attributes: { email: r.email, name: r.name, role: r.role, unitSystem: r.unit_system, deactivatedAt: r.deactivated_at },
      },
    ];
  }
}

function createLucia() {
  const adapter = new SessionAdapter(db(), sessions, users);
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(30, "d"),
    sessionCookie: {
      name: "br_session",
      expires: true,
      attributes: { secure: env().PUBLIC_URL.startsWith("https://"), sameSite: "lax", path: "/" },
    },
    getUserAttributes: (a) => ({
      email: a.email,
      name: a.name,
      role: a.role,
      unitSystem: a.unitSystem,
      deactivatedAt: a.deactivatedAt,
    }),
  });
}

let luciaInstance: ReturnType<typeof createLucia> | undefined;
export function lucia() {
  luciaInstance ??= createLucia();
  return luciaInstance;
}

declare module "lucia" {
  interface Register {
    Lucia: ReturnType<typeof createLucia>;
    DatabaseUserAttributes: {
      email: string;
      name: string;
      role: Role;
      unitSystem: "metric" | "inch";
      deactivatedAt: Date | null;
    };
  }
}

export type SessionUser = {
  id: string;
  email: string;
  name: string;
  role: Role;
  unitSystem: "metric" | "inch";
};

/** What the session checks read of a request: its URL and its headers (the cookie). */
export type RequestLike = { readonly url: string; readonly headers: Pick<Headers, "get"> };

type Validated = { user: SessionUser; session: Session } | null;

function readSessionId(request: RequestLike): string | null {
  return lucia().readSessionCookie(request.headers.get("cookie") ?? "");
}

/** The session and its person, read from PostgreSQL (one query); a deactivated person's sessions end. */
async function validate(request: RequestLike): Promise<Validated> {
  const id = readSessionId(request);
  if (!id) return null;
  const { session, user } = await lucia().validateSession(id);
  if (!session || !user) return null;
  if (user.deactivatedAt) {
    await lucia().invalidateUserSessions(user.id);
    return null;
  }
  return { session, user: { id: user.id, email: user.email, name: user.name, role: user.role, unitSystem: user.unitSystem } };
}

/** A 503 the ErrorBoundary shows as "database unavailable" instead of a stack trace. */
export function databaseUnavailable(request?: RequestLike) {
  const reason = "The shop database is not answering. Try again in a minute; if it persists, tell the admin.";
  if (request && isApi(request)) return Response.json({ error: "database unavailable", reason }, { status: 503 });
  return data({ message: reason }, { status: 503 });
}

/**
 * The signed-in person for this request, or null. Validated once per request: React Router
 * hands each loader its own Request, so the result is kept in the request store by session id.
 */
export function getSession(request: RequestLike): Promise<Validated> {
  const run = () =>
    validate(request).catch((err) => {
      if (isDatabaseDown(err)) throw databaseUnavailable(request);
      throw err;
    });
  const id = readSessionId(request);
  return id ? memoForRequest(`session:${id}`, run) : run();
}

export async function getUser(request: RequestLike): Promise<SessionUser | null> {
  return (await getSession(request))?.user ?? null;
}

function isApi(request: RequestLike) {
  return new URL(request.url).pathname.startsWith("/api/");
}

const SIGNED_OUT_REASON = "You are signed out (the session ended or was closed). Sign in again.";

/** Throws 401 (API) or a redirect to sign-in with a return path (pages). */
export async function requireUser(request: RequestLike): Promise<SessionUser> {
  const user = await getUser(request);
  if (user) return user;
  if (isApi(request)) throw Response.json({ error: "sign-in required", reason: SIGNED_OUT_REASON }, { status: 401 });
  const url = new URL(request.url);
  const next = url.pathname.replace(/\.data$/, "") + url.search;
  throw redirect(`/signin?next=${encodeURIComponent(next)}`);
}

export function forbidden(request: RequestLike, reason: string): never {
  if (isApi(request)) throw Response.json({ error: "forbidden", reason }, { status: 403 });
  throw data({ message: reason }, { status: 403 });
}

export function assertCan(request: RequestLike, user: SessionUser, permission: Permission): void {
  if (!can(user.role, permission)) {
    forbidden(request, forbiddenReason(user.role, permission));
  }
}

/** The guard at the top of every loader and action: signed in, and allowed. */
export async function requirePermission(request: RequestLike, permission: Permission): Promise<SessionUser> {
  const user = await requireUser(request);
  assertCan(request, user, permission);
  return user;
}

// ---- sign-in with throttling ---------------------------------------------------------------

export type SignInResult =
  | { ok: true; user: SessionUser; cookie: string }
  | { ok: false; reason: "throttled"; refusal: Refusal }
  | { ok: false; reason: "invalid" | "deactivated" };

let dummyHash: Promise<string> | undefined;

/** Checks the password under the throttles (app/lib/throttle.server.ts) and starts a session. */
export async function signIn(request: Request, emailInput: string, password: string): Promise<SignInResult> {
  const email = accountKey(emailInput);
  const [row] = await db().select().from(users).where(sql`lower(${users.email}) = ${email}`).limit(1);
  const outcome = await throttledPasswordCheck(email, clientAddress(request), async () => {
    if (row?.passwordHash) return verifyPassword(row.passwordHash, password);
    dummyHash ??= hashPassword("not-a-real-password");
    await verifyPassword(await dummyHash, password); // same cost as a real check
    return false;
  });
  if ("refused" in outcome) return { ok: false, reason: "throttled", refusal: outcome.refused };
  if (!outcome.ok || !row) return { ok: false, reason: "invalid" };
  if (row.deactivatedAt) return { ok: false, reason: "deactivated" };

  const cookie = await startSession(request, row.id);
  return {
    ok: true,
    cookie,
    user: { id: row.id, email: row.email, name: row.name, role: row.role, unitSystem: row.unitSystem },
  };
}

/** A fresh session id for the user; any session the request carried is ended (rotation). */
export async function startSession(request: Request, userId: string): Promise<string> {
  const previous = readSessionId(request);
  if (previous) await lucia().invalidateSession(previous);
  const session = await lucia().createSession(userId, {});
  return lucia().createSessionCookie(session.id).serialize();
}

export async function signOut(request: Request): Promise<string> {
  const id = readSessionId(request);
  if (id) await lucia().invalidateSession(id);
  return lucia().createBlankSessionCookie().serialize();
}

export async function endAllSessions(userId: string): Promise<void> {
  await lucia().invalidateUserSessions(userId);
}

/** Cookie to set when lucia extended the session, for the root middleware. */
export async function refreshedCookie(request: RequestLike): Promise<string | null> {
  const v = await getSession(request);
  if (v?.session.fresh) return lucia().createSessionCookie(v.session.id).serialize();
  return null;
}
