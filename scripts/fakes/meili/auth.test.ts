/** With a master key, every route but /health needs `Authorization: Bearer <key>`. */
import { Meilisearch, MeilisearchApiError } from "meilisearch";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMeiliFake, type MeiliFake } from "./server";

let fake: MeiliFake;
beforeAll(async () => {
  fake = await startMeiliFake({ port: 0, masterKey: "local-test-key" });
});
afterAll(() => fake.close());

async function failure(p: Promise<unknown>) {
  const e = await p.then(
    () => null,
    (x: unknown) => x,
  );
  expect(e).toBeInstanceOf(MeilisearchApiError);
  return { status: (e as MeilisearchApiError).response.status, body: (e as MeilisearchApiError).cause };
}

describe("master key", () => {
  it("answers 401 missing_authorization_header without a key", async () => {
    const r = await failure(new Meilisearch({ host: fake.url }).getIndexes());
    expect(r).toEqual({
      status: 401,
      body: {
        message: "The Authorization header is missing. It must use the bearer authorization method.",
        code: "missing_authorization_header",
        type: "auth",
        link: "https://docs.meilisearch.com/errors#missing_authorization_header",
      },
    });
  });

  it("answers 403 invalid_api_key for a wrong key", async () => {
    const r = await failure(new Meilisearch({ host: fake.url, apiKey: "wrong" }).index("x").search("q"));
    expect(r).toEqual({
      status: 403,
      body: {
        message: "The provided API key is invalid.",
        code: "invalid_api_key",
        type: "auth",
        link: "https://docs.meilisearch.com/errors#invalid_api_key",
      },
    });
  });

  it("serves everything with the right key, and /health without one", async () => {
    const client = new Meilisearch({ host: fake.url, apiKey: "local-test-key" });
    expect((await client.createIndex("secure").waitTask()).status).toBe("succeeded");
    expect((await client.getIndexes()).total).toBe(1);
    expect(await new Meilisearch({ host: fake.url }).health()).toEqual({ status: "available" });
  });
});
