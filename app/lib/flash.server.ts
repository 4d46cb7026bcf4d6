import { createCookieSessionStorage, redirect } from "react-router";
import { env } from "./env.server";

/** "out": a result out of spec (red, not the green of "ok"); "caution": done, with something left to do (brass). */
export type Flash = { kind: "ok" | "error" | "out" | "caution"; message: string };

let storage: ReturnType<typeof createCookieSessionStorage<Record<string, never>, { flash: Flash }>> | undefined;
function flashStorage() {
  storage ??= createCookieSessionStorage<Record<string, never>, { flash: Flash }>({
    cookie: {
      name: "br_flash",
      httpOnly: true,
      sameSite: "lax",
      path: "/",
      secrets: [env().SESSION_SECRET],
      secure: env().PUBLIC_URL.startsWith("https://"),
    },
  });
  return storage;
}

/** Redirects and shows a short message on the next page. */
export async function redirectWithFlash(to: string, flash: Flash, init: { headers?: HeadersInit } = {}) {
  const s = flashStorage();
  const session = await s.getSession();
  session.flash("flash", flash);
  const headers = new Headers(init.headers);
  headers.append("Set-Cookie", await s.commitSession(session));
  return redirect(to, { headers });
}

/** Reads (and clears) the message for the root loader. */
export async function readFlash(request: Request): Promise<{ flash: Flash | null; setCookie: string | null }> {
  const s = flashStorage();
  const cookie = request.headers.get("cookie");
  if (!cookie?.includes("br_flash=")) return { flash: null, setCookie: null };
  const session = await s.getSession(cookie);
  const flash = session.get("flash") ?? null;
  return { flash, setCookie: await s.commitSession(session) };
}
