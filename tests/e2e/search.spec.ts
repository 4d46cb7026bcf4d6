import { expect, test } from "@playwright/test";

async function signIn(page: import("@playwright/test").Page, email: string) {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/signin"));
}

test("the header box shows grouped results as you type; a mark hit opens the player at its second", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  // "/" focuses the header search box (once the page has hydrated).
  await expect(async () => {
    await page.keyboard.press("/");
    await expect(page.locator("#header-search")).toBeFocused({ timeout: 500 });
  }).toPass({ timeout: 10_000 });
  // The box's fetcher asks /api/search for plain JSON (the route's clientLoader),
  // never React Router's `.data` request.
  const asked: string[] = [];
  page.on("request", (r) => {
    const u = new URL(r.url());
    if (u.pathname.startsWith("/api/search")) asked.push(u.pathname);
  });
  await page.keyboard.type("stud 4 reads 51");
  const dropdown = page.getByTestId("search-dropdown");
  await expect(dropdown.getByRole("heading", { name: "Marks in recordings" })).toBeVisible({ timeout: 20_000 });
  expect(asked.length).toBeGreaterThan(0);
  expect([...new Set(asked)]).toEqual(["/api/search"]);
  const hit = dropdown.getByTestId("search-hit").filter({ hasText: "Final pass 110" }).first();
  await expect(hit).toContainText("at 0:18");
  await expect(hit.locator("mark").first()).toBeVisible(); // highlighted words
  await hit.click();
  await expect(page).toHaveURL(/\/recordings\/[0-9a-f-]+\?t=18\.4/);
  // The demo clip is processed by the worker after seeding; the player then starts at 18.4 s.
  await expect
    .poll(async () => page.evaluate(() => document.querySelector("video")?.currentTime ?? -1), { timeout: 45_000 })
    .toBeGreaterThan(18.3);
  expect(await page.evaluate(() => document.querySelector("video")!.currentTime)).toBeLessThan(18.6);
});

test("the header box says so when search cannot be reached, and the page stays as it was", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  const heading = page.locator("h1").first();
  await expect(heading).toHaveText("Good to see you, Jamie"); // the shop floor, rendered
  await page.route("**/api/search?**", (route) => route.abort("connectionrefused"));
  await page.locator("#header-search").fill("torque");
  const dropdown = page.getByTestId("search-dropdown");
  await expect(dropdown).toContainText("Search did not answer. Check the connection and type again.", { timeout: 10_000 });
  await expect(heading).toHaveText("Good to see you, Jamie"); // no error page took over
  // Back on the network, the next pause in typing brings results.
  await page.unroute("**/api/search?**");
  await page.locator("#header-search").fill("torq");
  await expect(dropdown.getByTestId("search-hit").first()).toBeVisible({ timeout: 10_000 });
});

test("Enter opens the search page with facets and counts; a facet filters", async ({ page }) => {
  await signIn(page, "marcus@larkspur.example");
  await page.locator("#header-search").fill("torque");
  await page.locator("#header-search").press("Enter");
  await expect(page).toHaveURL(/\/search\?q=torque/);
  await expect(page.getByTestId("search-total")).toContainText("match");
  const kindFacets = page.getByTestId("facet-kind");
  await expect(kindFacets.first()).toBeVisible();
  const marks = kindFacets.filter({ hasText: "Marks in recordings" });
  const count = Number((await marks.locator("span").last().textContent()) ?? "0");
  expect(count).toBeGreaterThan(0);
  await marks.click();
  await expect(page).toHaveURL(/type=mark/);
  await expect(page.getByTestId("search-result")).toHaveCount(Math.min(count, 20));
  for (const r of await page.getByTestId("search-result").all()) await expect(r).toContainText("Marks in recordings");
});

test("an editor adds a group of search words (a lone word is refused with a field error) and changes it", async ({ page }) => {
  await signIn(page, "priya@larkspur.example");
  // Words of this run only, so that a retry does not meet the group the first try added.
  const tag = Date.now()
    .toString(36)
    .replace(/[0-9]/g, (d) => "abcdefghij"[Number(d)]);
  const [snout, nose, third] = [`snout${tag}`, `nose${tag}`, `front${tag}`];
  await page.goto("/search");
  await page.getByRole("link", { name: "Edit search words" }).click();
  await expect(page.getByRole("heading", { name: "Search words", level: 1 })).toBeVisible();
  const add = page.locator("form").filter({ has: page.getByRole("heading", { name: "Add a group" }) });
  // A word on its own is not a group: the field says so and keeps what was typed.
  await add.getByLabel("Words that mean the same").fill(`crank ${snout}`);
  await add.getByRole("button", { name: "Add the group" }).click();
  await expect(add.getByRole("alert")).toContainText("at least two words");
  await expect(add.getByLabel("Words that mean the same")).toHaveValue(`crank ${snout}`);
  await add.getByLabel("Words that mean the same").fill(`Crank ${snout}, crankshaft ${nose}`);
  await add.getByRole("button", { name: "Add the group" }).click();
  await expect(page.getByText(`Added: crank ${snout}, crankshaft ${nose}.`)).toBeVisible();
  const group = page.getByTestId("word-group").filter({ hasText: `crankshaft ${nose}` });
  await expect(group.getByRole("listitem")).toHaveText([`crank ${snout}`, `crankshaft ${nose}`]);
  await expect(group).toContainText("Changed by Priya");

  await group.getByText("Change these words").click();
  await group.getByLabel("Words that mean the same").fill(`crank ${snout}, crankshaft ${nose}, crank ${third}`);
  await group.getByRole("button", { name: "Save the group" }).click();
  await expect(page.getByText(`Saved: crank ${snout}, crankshaft ${nose}, crank ${third}.`)).toBeVisible();
  await expect(
    page
      .getByTestId("word-group")
      .filter({ hasText: `crank ${third}` })
      .getByRole("listitem"),
  ).toHaveCount(3);
});

test("two editors change one group: the later save shows the group as it is now and keeps the typed words", async ({ browser }) => {
  const tag = Date.now()
    .toString(36)
    .replace(/[0-9]/g, (d) => "abcdefghij"[Number(d)]);
  const open = async (email: string) => {
    const page = await (await browser.newContext()).newPage();
    await signIn(page, email);
    await page.goto("/search/words");
    return page;
  };
  const first = await open("priya@larkspur.example");
  const add = first.locator("form").filter({ has: first.getByRole("heading", { name: "Add a group" }) });
  await add.getByLabel("Words that mean the same").fill(`sump${tag}, oil pan${tag}`);
  await add.getByRole("button", { name: "Add the group" }).click();
  await expect(first.getByText(`Added: sump${tag}, oil pan${tag}.`)).toBeVisible();
  const second = await open("dana@larkspur.example");

  const mine = first.getByTestId("word-group").filter({ hasText: `sump${tag}` });
  await mine.getByText("Change these words").click();
  await mine.getByLabel("Words that mean the same").fill(`sump${tag}, oil pan${tag}, drip tray${tag}`);
  const theirs = second.getByTestId("word-group").filter({ hasText: `sump${tag}` });
  await theirs.getByText("Change these words").click();
  await theirs.getByLabel("Words that mean the same").fill(`sump${tag}, oil pan${tag}, crankcase bottom${tag}`);
  await theirs.getByRole("button", { name: "Save the group" }).click();
  await expect(second.getByText("Saved:")).toBeVisible();

  await mine.getByRole("button", { name: "Save the group" }).click();
  await expect(mine.getByRole("alert")).toContainText("Someone changed this group while you were editing it");
  await expect(mine.getByRole("listitem")).toHaveText([`sump${tag}`, `oil pan${tag}`, `crankcase bottom${tag}`]); // the list as it is now
  await expect(mine.getByLabel("Words that mean the same")).toHaveValue(`sump${tag}, oil pan${tag}, drip tray${tag}`);
  await mine.getByRole("button", { name: "Save the group" }).click(); // on purpose this time
  await expect(first.getByText(`Saved: sump${tag}, oil pan${tag}, drip tray${tag}.`)).toBeVisible();
});

test("a spec hit opens the procedure scrolled to the spec, marked (no motion when reduced motion is asked for)", async ({ page }) => {
  await page.emulateMedia({ reducedMotion: "reduce" });
  await signIn(page, "jamie@larkspur.example");
  await page.locator("#header-search").fill("head stud final torque");
  const dropdown = page.getByTestId("search-dropdown");
  await expect(dropdown.getByRole("heading", { name: "Specs" })).toBeVisible({ timeout: 20_000 });
  const specs = dropdown.locator("section").filter({ has: page.getByRole("heading", { name: "Specs" }) });
  await specs.getByTestId("search-hit").filter({ hasText: "Head stud final torque" }).first().click();
  await expect(page).toHaveURL(/\/procedures\/head-stud-installation-and-torque-sequence#spec-studs-final$/);
  const spec = page.locator("#spec-studs-final");
  await expect(spec).toHaveClass(/landing-target/);
  await expect(spec).toBeInViewport();
  expect(await page.evaluate(() => window.scrollY)).toBeGreaterThan(0); // not left at the top
  await expect(spec).toBeFocused();
  expect(await spec.evaluate((el) => getComputedStyle(el).animationName)).toBe("none");
  // Opened afresh (a shared link), the same address lands on the same spec.
  await page.reload();
  await expect(page.locator("#spec-studs-final")).toBeInViewport();
  expect(await page.evaluate(() => document.querySelector(":target")?.id)).toBe("spec-studs-final");
});

test("a recording's readings are one result listing those that matched; one opens the recording at it, its row marked", async ({
  page,
}) => {
  await signIn(page, "marcus@larkspur.example");
  await page.goto(`/search?q=${encodeURIComponent("torque moly")}&type=reading`);
  // Other tests add recordings with torque readings of their own to the shared database, so
  // the check is per recording: each appears once, the demo's among them.
  const all = page.getByTestId("search-result");
  await expect(all.first()).toBeVisible();
  const hrefs = await all.evaluateAll((els) => els.map((e) => e.querySelector("a")?.getAttribute("href")?.split(/[?#]/)[0]));
  expect(new Set(hrefs).size, "one result per recording").toBe(hrefs.length);
  const results = all.filter({ hasText: "Head stud clamp-load test, M12" });
  await expect(results).toHaveCount(1);
  const listed = results.first().getByTestId("search-reading");
  expect(await listed.count()).toBeGreaterThan(1);
  await expect(listed.first().locator("mark").first()).toBeVisible();
  const href = (await listed.first().getAttribute("href"))!;
  const id = /#reading-([0-9a-f-]+)$/.exec(href)![1];
  await listed.first().click();
  await expect(page).toHaveURL(/\/recordings\/[0-9a-f-]+\?t=[0-9.]+#reading-/);
  const row = page.locator(`#reading-${id}`);
  await expect(row).toHaveClass(/landing-target/, { timeout: 15_000 });
  await expect(row).toBeInViewport();
  await expect(row).toBeFocused();
});

test("a procedure hit found in a step opens the page at that step (a text fragment, loaded as a page)", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  await page.goto(`/search?q=${encodeURIComponent("chase every block thread")}&type=procedure`);
  const hit = page
    .getByTestId("search-result")
    .filter({ hasText: "Head stud installation and torque sequence" })
    .first()
    .getByRole("link")
    .first();
  expect(await hit.getAttribute("href")).toMatch(/^\/procedures\/head-stud-installation-and-torque-sequence#:~:text=Chase/);
  await hit.click();
  await page.waitForURL(/\/procedures\/head-stud-installation-and-torque-sequence/);
  const step = page.getByText("Chase every block thread and blow it out", { exact: false });
  await expect(step).toBeInViewport();
  expect(await page.evaluate(() => window.scrollY)).toBeGreaterThan(0);
});

test("on a 768 px tablet the header box's results are readable and each is at least 44 px tall", async ({ browser }) => {
  const page = await (await browser.newContext({ viewport: { width: 768, height: 1024 } })).newPage();
  await signIn(page, "jamie@larkspur.example");
  await page.locator("#header-search").fill("torque moly");
  const hits = page.getByTestId("search-dropdown").getByTestId("search-hit");
  await expect(hits.first()).toBeVisible({ timeout: 20_000 });
  for (const hit of (await hits.all()).slice(0, 6)) {
    const box = (await hit.boundingBox())!;
    expect(box.height).toBeGreaterThanOrEqual(44);
    // The hit's title at 16 px, its snippet at no less than 14 px (it was 12 px).
    expect(await hit.evaluate((el) => parseFloat(getComputedStyle(el).fontSize))).toBeGreaterThanOrEqual(16);
    for (const size of await hit.locator("span").evaluateAll((els) => els.map((e) => parseFloat(getComputedStyle(e).fontSize))))
      expect(size).toBeGreaterThanOrEqual(14);
  }
});
