// Keyboard alone: a story walked without the mouse, the focus ring seen at every stop, focus
// landing where the person needs it after a form comes back with errors, after a page opens
// and after a dialog closes; and motion that follows prefers-reduced-motion (app/app.css).
import { expect, test, type Page } from "@playwright/test";
import { DEMO_PASSWORD, signIn } from "../support/browser";

const BRASS = "rgb(133, 96, 28)"; // --color-brass in app/app.css

type Focused = { label: string; outlineStyle: string; outlineWidth: number; outlineColor: string; tag: string };

/** What has the focus, and the ring it draws. */
async function focused(page: Page): Promise<Focused> {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement;
    const cs = getComputedStyle(el);
    const label =
      el.getAttribute("aria-label") || (el as HTMLInputElement).labels?.[0]?.textContent || el.textContent || el.id || el.tagName;
    return {
      label: label.trim().slice(0, 60),
      outlineStyle: cs.outlineStyle,
      outlineWidth: parseFloat(cs.outlineWidth),
      outlineColor: cs.outlineColor,
      tag: el.tagName,
    };
  });
}

/** Tab (at most `max` times) until `want` has the focus; every stop on the way must show the brass ring. */
async function tabTo(page: Page, want: (f: Focused) => boolean, max = 25): Promise<Focused[]> {
  const stops: Focused[] = [];
  for (let i = 0; i < max; i++) {
    await page.keyboard.press("Tab");
    const f = await focused(page);
    stops.push(f);
    expect(f.outlineStyle, `focus ring on ${f.tag} “${f.label}”`).toBe("solid");
    expect(f.outlineWidth, `focus ring width on “${f.label}”`).toBeGreaterThanOrEqual(2);
    expect(f.outlineColor, `focus ring colour on “${f.label}”`).toBe(BRASS);
    if (want(f)) return stops;
  }
  throw new Error(`not reached in ${max} Tabs; stops: ${stops.map((s) => s.label).join(" → ")}`);
}

test("an apprentice signs in, searches and opens a hit by keyboard alone, the focus ring visible at every stop", async ({ page }) => {
  await page.goto("/signin");
  // The e-mail field has the focus on arrival; a wrong password puts it on the message that says so.
  await expect(page.getByLabel("E-mail")).toBeFocused();
  await page.keyboard.type("jamie@larkspur.example");
  await page.keyboard.press("Tab");
  await page.keyboard.type("not-the-password");
  await page.keyboard.press("Enter");
  const message = page.getByRole("alert").filter({ hasText: "do not match" });
  await expect(message).toBeFocused();
  await tabTo(page, (f) => f.tag === "INPUT" && f.label === "E-mail");
  await page.keyboard.press("Tab");
  await page.keyboard.type(DEMO_PASSWORD);
  await page.keyboard.press("Enter");
  await expect(page.getByTestId("user-name")).toHaveText("Jamie Cole");

  // The first Tab offers to skip the header; then on to the search box.
  await page.keyboard.press("Tab");
  const skip = page.getByRole("link", { name: "Skip to the page" });
  await expect(skip).toBeFocused();
  expect((await skip.boundingBox())!.width).toBeGreaterThan(40); // shown while it has the focus
  const stops = await tabTo(page, (f) => f.tag === "INPUT" && f.label.startsWith("Search"));
  expect(stops.length).toBeLessThanOrEqual(3); // the wordmark, then the search box: no detour
  await page.keyboard.type("head stud torque");
  const firstHit = page.getByTestId("search-hit").first();
  await expect(firstHit).toBeVisible();
  // Escape closes the results and leaves the focus in the box that opened them.
  await page.keyboard.press("Escape");
  await expect(page.getByTestId("search-dropdown")).toHaveCount(0);
  await expect(page.locator("#header-search")).toBeFocused();
  await page.keyboard.press("Control+A"); // a search box may clear itself on Escape: type the words again
  await page.keyboard.type("head stud torque");
  await expect(firstHit).toBeVisible();
  // Tab walks into the results; Enter opens the hit.
  await page.keyboard.press("Tab");
  await expect(firstHit).toBeFocused();
  expect((await focused(page)).outlineColor).toBe(BRASS);
  const href = (await firstHit.getAttribute("href"))!;
  await page.keyboard.press("Enter");
  await expect(page).toHaveURL((u) => `${u.pathname}${u.search}${u.hash}` === href);
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
});

test("after a link inside the page opens another page, the focus is on the new page's content", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  await page.goto("/procedures");
  const link = page
    .locator("main#main")
    .getByRole("link", { name: /Head stud installation and torque sequence/ })
    .first();
  await link.focus();
  await page.keyboard.press("Enter");
  await page.waitForURL(/\/procedures\/head-stud-installation-and-torque-sequence$/);
  await expect(page.getByRole("heading", { level: 1 })).toContainText("Head stud installation");
  // The link that had the focus went with the old page: the focus is on the new page's content,
  // and the next Tab goes on from there rather than from the top of the document.
  await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe("main");
  await page.keyboard.press("Tab");
  expect(await page.evaluate(() => document.activeElement?.closest("main") != null)).toBe(true);
});

test("a form sent back with errors puts the focus on the first field in error", async ({ page }) => {
  await page.goto("/signin?next=/account");
  await page.getByLabel("E-mail").fill("marcus@larkspur.example");
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.keyboard.press("Enter");
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
  await page.getByLabel("Current password").fill(DEMO_PASSWORD);
  await page.getByLabel("New password", { exact: true }).fill("short");
  await page.getByLabel("New password again").fill("short");
  await page.keyboard.press("Enter"); // from the last field, as a keyboard user sends it
  const field = page.getByLabel("New password", { exact: true });
  await expect(field).toHaveAttribute("aria-invalid", "true");
  await expect(field).toBeFocused();
  // The error is read with the field.
  const describedBy = (await field.getAttribute("aria-describedby"))!;
  await expect(page.locator(`[id="${describedBy}"]`)).toContainText(/10/);
});

test("closing a confirmation returns the focus to the button that asked for it", async ({ page }) => {
  await page.goto("/signin?next=/procedures/new");
  await page.getByLabel("E-mail").fill("priya@larkspur.example");
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.keyboard.press("Enter");
  await page.getByLabel("Title").fill(`Keyboard check draft ${Date.now().toString(36)}`);
  await page.keyboard.press("Enter");
  await expect(page).toHaveURL(/\/r\/1\/edit$/);
  await page.goto(page.url().replace(/\/edit$/, ""));
  const discard = page.getByRole("button", { name: /Discard/ });
  await discard.focus();
  let asked = "";
  page.once("dialog", (d) => {
    asked = d.message();
    void d.dismiss();
  });
  await page.keyboard.press("Enter");
  await expect.poll(() => asked).toContain("Discard this draft");
  await expect(discard).toBeFocused();
  await expect(page).toHaveURL(/\/r\/1$/); // dismissed: nothing was discarded
});

test("motion follows prefers-reduced-motion: transitions become instant", async ({ browser }) => {
  const durations = async (reducedMotion: "reduce" | "no-preference") => {
    const context = await browser.newContext({ reducedMotion });
    const page = await context.newPage();
    await page.goto("/signin");
    await page.getByLabel("E-mail").fill("jamie@larkspur.example");
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.keyboard.press("Enter");
    await expect(page.getByTestId("user-name")).toBeVisible();
    // Every element of the shop floor that declares a transition or an animation, in seconds.
    const found = await page.evaluate(() =>
      [...document.querySelectorAll<HTMLElement>("body *")].flatMap((el) => {
        const cs = getComputedStyle(el);
        const secs = (v: string) => v.split(",").map((d) => (d.trim().endsWith("ms") ? parseFloat(d) / 1000 : parseFloat(d)));
        const moving = cs.transitionProperty !== "all" || cs.transitionDuration !== "0s" ? secs(cs.transitionDuration) : [];
        const animated = cs.animationName !== "none" ? secs(cs.animationDuration) : [];
        return [...moving, ...animated];
      }),
    );
    await context.close();
    return found;
  };
  const normal = await durations("no-preference");
  expect(Math.max(...normal)).toBeGreaterThan(0.05); // the tiles do ease (so the check below means something)
  const reduced = await durations("reduce");
  expect(reduced.length).toBeGreaterThan(0);
  expect(Math.max(...reduced)).toBeLessThanOrEqual(0.001);
});
