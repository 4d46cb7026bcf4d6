// Helpers for integration tests: they talk HTTP to the app that `npm test` started, and
// use the app's own modules for set-up (people and sessions created directly).
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { users } from "~/db/schema";
import { hashPassword, lucia } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import type { Role } from "~/lib/permissions";

export const BASE_URL = process.env.BENCHREEL_URL ?? "";
if (!BASE_URL) throw new Error("BENCHREEL_URL is not set: run integration tests through `npm test -- --only integration`.");

export type TestUser = { id: string; email: string; name: string; role: Role; password: string; cookie: string };

/** A fresh person with the role, signed in (a session made directly). */
export async function createUser(role: Role, opts: { password?: string; name?: string } = {}): Promise<TestUser> {
  const id = randomUUID();
  const email = `${role}-${id.slice(0, 8)}@test.larkspur.example`;
  const password = opts.password ?? "test-password-123";
  const name = opts.name ?? `Test ${role} ${id.slice(0, 4)}`;
  await db()
    .insert(users)
    .values({ id, email, name, role, passwordHash: await hashPassword(password) });
  const session = await lucia().createSession(id, {});
  return { id, email, name, role, password, cookie: cookieHeader(lucia().createSessionCookie(session.id).serialize()) };
}

export async function sessionCookieFor(email: string): Promise<string> {
  const [u] = await db().select().from(users).where(eq(users.email, email));
  if (!u) throw new Error(`no user ${email}`);
  const session = await lucia().createSession(u.id, {});
  return cookieHeader(lucia().createSessionCookie(session.id).serialize());
}

/** "name=value; Path=/; …" → "name=value" */
export function cookieHeader(setCookie: string): string {
  return setCookie.split(";")[0];
}

export function cookiesFrom(res: Response): string {
  return res.headers.getSetCookie().map(cookieHeader).join("; ");
}

type Req = {
  method?: string;
  cookie?: string;
  form?: Record<string, string>;
  json?: unknown;
  headers?: Record<string, string>;
  origin?: string | null;
  body?: BodyInit;
};

/** A request like the browser's: same-origin Origin header, no redirects followed. */
export async function http(path: string, req: Req = {}): Promise<Response> {
  const headers = new Headers(req.headers);
  if (req.cookie) headers.set("cookie", req.cookie);
  const method = req.method ?? (req.form || req.json ? "POST" : "GET");
  if (method !== "GET" && method !== "HEAD" && req.origin !== null) headers.set("origin", req.origin ?? BASE_URL);
  let body: BodyInit | undefined = req.body;
  if (req.form) body = new URLSearchParams(req.form);
  if (req.json !== undefined) {
    body = JSON.stringify(req.json);
    headers.set("content-type", "application/json");
  }
  return fetch(new URL(path, BASE_URL), { method, headers, body, redirect: "manual" });
}

export type Captured = {
  id: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  links: string[];
  receivedAt: string;
  attachments?: { filename: string; contentType: string; size: number; contentBase64: string }[];
};

/** The fake's messages, newest first; only those to one address when `to` is given. */
export async function mailbox(to?: string): Promise<Captured[]> {
  const res = await fetch(`${process.env.SMTP_CONTROL_URL}/messages${to ? `?to=${encodeURIComponent(to)}` : ""}`);
  return (await res.json()) as Captured[];
}

export async function smtp(action: "stop" | "start"): Promise<void> {
  await fetch(`${process.env.SMTP_CONTROL_URL}/smtp/${action}`, { method: "POST" });
}

/** Polls until the function returns a truthy value or the time runs out. */
export async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 15_000, stepMs = 150): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < deadline) {
    try {
      const v = await fn();
      if (v) return v;
    } catch (err) {
      last = err;
    }
    await new Promise((r) => setTimeout(r, stepMs));
  }
  throw new Error(`waitFor timed out${last ? `: ${String(last)}` : ""}`);
}

export async function mailTo(email: string, subjectPart: string, timeoutMs = 25_000): Promise<Captured> {
  return waitFor(async () => (await mailbox(email)).find((m) => m.subject.includes(subjectPart)), timeoutMs);
}
