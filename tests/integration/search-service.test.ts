// The search service the app is pointed at (MEILI_HOST, MEILI_API_KEY, SEARCH_INDEX: the local
// stand-in in a test run, a shop's own Meilisearch in production; docs/deploying.md): once the
// worker has started, the index exists with the app's settings applied, and the server refuses
// a client without the key.
import { Meilisearch } from "meilisearch";
import { expect, it } from "vitest";
import { SEARCH_SETTINGS } from "~/lib/search/client.server";
import { waitFor } from "../support/app";

const host = process.env.MEILI_HOST ?? "";
const index = process.env.SEARCH_INDEX ?? "benchreel";

it("the index the app uses carries the app's settings, applied at start", async () => {
  const client = new Meilisearch({ host, apiKey: process.env.MEILI_API_KEY });
  const settings = await waitFor(() => client.index(index).getSettings());
  expect(settings.rankingRules).toEqual(SEARCH_SETTINGS.rankingRules);
  expect([...(settings.filterableAttributes ?? [])].sort()).toEqual([...SEARCH_SETTINGS.filterableAttributes].sort());
  expect(settings.sortableAttributes).toEqual(SEARCH_SETTINGS.sortableAttributes);
  expect(settings.typoTolerance?.minWordSizeForTypos).toEqual(SEARCH_SETTINGS.typoTolerance.minWordSizeForTypos);
});

it("the server refuses a client with a wrong key", async () => {
  const stranger = new Meilisearch({ host, apiKey: "not-the-shop-key" });
  await expect(stranger.index(index).getSettings()).rejects.toMatchObject({
    cause: { code: expect.stringMatching(/invalid_api_key|missing_authorization_header/) },
  });
});
