// PostgreSQL stopped under the running app: every route answers the same "database
// unavailable" (a 503 page, or 503 JSON under /api), never a bare 500. The test stops this test
// run's own cluster (each `npm test` has its own, scripts/test.mjs) and starts it again with
// the functions `npm test` uses, then waits until the app answers from the database again.
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { startPostgres, stopPostgres } from "../../scripts/lib/stack.mjs";
import { createUser, http, waitFor, type TestUser } from "../support/app";
import { configuredRoutes } from "../support/routes";

const UNAVAILABLE = "The shop database is not answering.";

let dataDir = "";
let signedIn: TestUser;

async function expectUnavailablePage(res: Response) {
  expect(res.status).toBe(503);
  const html = await res.text();
  expect(html).toContain("Database unavailable");
  expect(html).toContain(UNAVAILABLE);
}

describe("with the database down", () => {
  beforeAll(async () => {
    signedIn = await createUser("builder");
    const { rows } = await db().execute<{ data_directory: string }>(sql`show data_directory`);
    dataDir = rows[0].data_directory;
    stopPostgres(dataDir);
  });

  afterAll(async () => {
    await startPostgres(dataDir, Number(new URL(env().DATABASE_URL).port));
    // Back when the app reads from it again (its pool makes new connections by itself).
    await waitFor(async () => (await http("/healthz")).status === 200, 30_000);
  });

  it("sign-in, reset, invitation and sign-out pages answer the database-unavailable page", async () => {
    await expectUnavailablePage(await http("/signin", { form: { email: "someone@larkspur.example", password: "a-password-1" } }));
    await expectUnavailablePage(await http("/reset", { form: { email: "someone@larkspur.example" } }));
    await expectUnavailablePage(await http("/reset/some-token"));
    await expectUnavailablePage(await http("/invite/some-token"));
    await expectUnavailablePage(await http("/signout", { method: "POST", form: {}, cookie: signedIn.cookie }));
  });

  it("signed-in pages say the same, and the API says it in JSON", async () => {
    await expectUnavailablePage(await http("/procedures", { cookie: signedIn.cookie }));
    const api = await http("/api/me", { cookie: signedIn.cookie });
    expect(api.status).toBe(503);
    expect(await api.json()).toMatchObject({ error: "database unavailable", reason: expect.stringContaining(UNAVAILABLE) });
  });

  it("no route of the config answers a bare 500: any 5xx is the same 503", async () => {
    const seen: string[] = [];
    const routes = configuredRoutes();
    let sent = 0;
    for (const { path } of routes) {
      // Any value will do for a param: nothing can be looked up anyway.
      const url = path
        .replace(/:(\w+)/g, (_, name: string) => (name === "number" ? "1" : "00000000-0000-4000-8000-000000000000"))
        .replace("*", "x");
      for (const cookie of [undefined, signedIn.cookie]) {
        for (const method of ["GET", "POST"]) {
          const res = await http(url, {
            method,
            cookie,
            ...(method === "POST" ? { form: { intent: "x", email: "someone@larkspur.example", password: "a-password-1" } } : {}),
          });
          const body = await res.text();
          sent++;
          if (res.status < 500 || path === "/healthz") continue;
          seen.push(`${method} ${url}${cookie ? " (signed in)" : ""}`);
          expect(res.status, `${method} ${url}`).toBe(503);
          expect(body, `${method} ${url}`).toContain(UNAVAILABLE);
        }
      }
    }
    console.log(
      `database down: ${routes.length} routes, ${sent} requests, ${seen.length} answered 503 "database unavailable", none another 5xx`,
    );
    // The public routes that reach the database first are among them.
    expect(seen).toEqual(
      expect.arrayContaining([
        "POST /signin",
        "POST /reset",
        "GET /invite/00000000-0000-4000-8000-000000000000",
        "POST /signout (signed in)",
      ]),
    );
  });

  it("health says the database is down", async () => {
    const res = await http("/healthz");
    expect(res.status).toBe(503);
    expect((await res.json()).database.ok).toBe(false);
  });
});
