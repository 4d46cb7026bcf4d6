// A tus client in a few plain requests, for suites that talk to several instances and need to
// say exactly which instance gets which request (tus-js-client picks its own endpoint).
import { createHash } from "node:crypto";

export type Target = { url: string; origin: string; cookie: string };

const TUS = { "Tus-Resumable": "1.0.0" };

export async function signIn(url: string, origin: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${url}/signin`, {
    method: "POST",
    headers: { origin, "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ email, password, next: "/" }),
    redirect: "manual",
  });
  if (res.status !== 302) throw new Error(`sign-in answered ${res.status}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
}

export function call(t: Target, path: string, init: RequestInit = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  headers.set("cookie", t.cookie);
  if (init.method && init.method !== "GET" && init.method !== "HEAD") headers.set("origin", t.origin);
  return fetch(`${t.url}${path}`, { ...init, headers, redirect: "manual" });
}

export async function createUpload(t: Target, size: number, fileName: string): Promise<string> {
  const meta = `filename ${Buffer.from(fileName).toString("base64")},filetype ${Buffer.from("video/mp4").toString("base64")}`;
  const res = await call(t, "/api/uploads", {
    method: "POST",
    headers: { ...TUS, "Upload-Length": String(size), "Upload-Metadata": meta },
  });
  if (res.status !== 201) throw new Error(`tus create answered ${res.status}: ${await res.text()}`);
  return new URL(res.headers.get("location") ?? "", t.url).pathname;
}

export async function offsetOf(t: Target, uploadPath: string): Promise<number> {
  const res = await call(t, uploadPath, { method: "HEAD", headers: TUS });
  if (res.status !== 200) throw new Error(`tus HEAD answered ${res.status}`);
  return Number(res.headers.get("upload-offset"));
}

export async function patch(t: Target, uploadPath: string, offset: number, bytes: Buffer): Promise<Response> {
  return call(t, uploadPath, {
    method: "PATCH",
    headers: { ...TUS, "Upload-Offset": String(offset), "Content-Type": "application/offset+octet-stream" },
    body: new Uint8Array(bytes),
  });
}

export const sha256 = (b: Buffer | Uint8Array) => createHash("sha256").update(b).digest("hex");

export async function waitReady(t: Target, id: string, timeoutMs = 90_000): Promise<Record<string, unknown>> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const res = await call(t, `/api/recordings/${id}`);
    if (res.ok) {
      const { recording } = (await res.json()) as { recording: Record<string, unknown> & { state: string } };
      if (recording.state !== "processing") return recording;
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`recording ${id} not processed in ${timeoutMs} ms`);
}
