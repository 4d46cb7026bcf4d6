// Accessibility, measured with axe-core: every page of the route config (app/routes.ts, read
// through tests/support/routes.ts so a new page is covered without anyone adding it), as each
// role and anonymously, at the desktop (1366 px) and tablet (768 px) widths, must have no
// violation of the WCAG 2.1 A and AA rules. Route params are filled with real records found
// through the app (the demo procedure, recording and test records; a draft for the editor;
// invitation and reset links from the mail the app sends). Resource routes (API, CSV, health)
// return no page and are left out.
import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Browser, type Page } from "@playwright/test";
import { DEMO_PEOPLE as PEOPLE, DEMO_PROCEDURE as STUDS, DEMO_RECORDING, signIn } from "../support/browser";
import { configuredRoutes } from "../support/routes";

const WCAG_TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];
const WIDTHS = [
  { label: "1366", width: 1366, height: 900 },
  { label: "768", width: 768, height: 1024 },
] as const;

/** The pages: route modules that render (a .tsx), except /signout, which only redirects (its GET signs nobody out but lands on /). */
const PAGES = configuredRoutes()
  .filter((r) => r.file.endsWith(".tsx") && !r.file.includes("/api/") && r.path !== "/signout")
  .map((r) => r.path);

type Finding = { who: string; width: string; path: string; rule: string; impact: string; help: string; targets: string[] };
type Params = { testRecord: string; draftSlug: string; invite: string; reset: string };
const checked = { count: 0 };
const findings: Finding[] = [];

/** The newest link to `kind` in a mail to `to`, read from the fake SMTP store. */
async function mailedLink(to: string, kind: "invite" | "reset"): Promise<string> {
  let link = "";
  await expect(async () => {
    const stored = (await (await fetch(`${process.env.SMTP_CONTROL_URL}/messages?to=${encodeURIComponent(to)}`)).json()) as {
      to: string[];
      links: string[];
    }[];
    link =
      stored
        .filter((m) => m.to.includes(to))
        .flatMap((m) => m.links)
        .filter((l) => new URL(l).pathname.startsWith(`/${kind}/`))
        .at(-1) ?? "";
    expect(link).not.toBe("");
  }).toPass({ timeout: 20_000 });
  return new URL(link).pathname;
}

/** Real values for the route params, looked up through the app once. */
async function lookUpParams(browser: Browser): Promise<Params> {
  const context = await browser.newContext();
  const page = await context.newPage();
  await signIn(page, PEOPLE.admin);
  await page.goto("/test-records");
  const href = await page
    .locator('a[href^="/test-records/"]')
    .filter({ hasNot: page.locator('[href$="/new"]') })
    .evaluateAll((as) => as.map((a) => a.getAttribute("href")!).find((h) => /^\/test-records\/[0-9a-f-]{36}$/.test(h)));
  expect(href, "a demo test record").toBeTruthy();
  // An invitation (its link is a page for the invitee) and a reset link for a demo person.
  const invitee = `a11y-${Date.now()}@larkspur.example`;
  await page.goto("/admin/people");
  const inviteForm = page.locator("form", { has: page.getByRole("button", { name: "Send invitation" }) });
  await inviteForm.getByLabel("E-mail").fill(invitee);
  await inviteForm.getByRole("button", { name: "Send invitation" }).click();
  await expect(page.getByTestId("flash")).toContainText(invitee);
  await context.close();

  // The seed has no draft: Priya starts one, so the editor is one of the pages.
  const editorContext = await browser.newContext();
  const editor = await editorContext.newPage();
  await signIn(editor, PEOPLE.editor);
  await editor.goto("/procedures/new");
  await editor.getByLabel("Title").fill(`Accessibility check draft ${Date.now().toString(36)}`);
  await editor.getByRole("button", { name: "Start the draft" }).click();
  await expect(editor).toHaveURL(/\/r\/1\/edit$/);
  const draftSlug = new URL(editor.url()).pathname.split("/")[2];
  await editorContext.close();

  const anon = await browser.newContext();
  const p = await anon.newPage();
  await p.goto("/reset");
  await p.getByLabel("E-mail").fill(PEOPLE.qc);
  await p.getByRole("button", { name: "Send me a link" }).click();
  await anon.close();
  return {
    testRecord: href!.split("/")[2],
    draftSlug,
    invite: await mailedLink(invitee, "invite"),
    reset: await mailedLink(PEOPLE.qc, "reset"),
  };
}

/** A route path with its params filled; a param this table does not know fails the run (add it here). */
function fill(path: string, p: Params): string {
  if (path === "/invite/:token") return p.invite;
  if (path === "/reset/:token") return p.reset;
  if (path === "/procedures/:slug/r/:number/edit") return `/procedures/${p.draftSlug}/r/1/edit`;
  if (path === "/procedures/:slug/compare") return `/procedures/${STUDS}/compare?from=2&to=3`;
  if (path.startsWith("/builds/:number")) return path.replace(":number", "LEW-24-0117");
  const filled = path
    .replace(":slug", STUDS)
    .replace(":number", "2")
    .replace(/^\/recordings\/:id/, `/recordings/${DEMO_RECORDING}`)
    .replace(/^\/test-records\/:id/, `/test-records/${p.testRecord}`)
    .replace(/^\/runs\/:id/, "/runs/5eed0000-0000-4000-8000-00000000a001");
  if (filled.includes(":") || filled.includes("*")) throw new Error(`accessibility.spec.ts: no demo value for the params of ${path}`);
  return filled;
}

async function settle(page: Page) {
  // The player keeps fetching video: a page is settled at network idle or after 5 s.
  await page.waitForLoadState("networkidle", { timeout: 5_000 }).catch(() => {});
}

async function audit(page: Page, who: string, path: string) {
  for (const w of WIDTHS) {
    await page.setViewportSize({ width: w.width, height: w.height });
    const result = await new AxeBuilder({ page }).withTags(WCAG_TAGS).analyze();
    checked.count++;
    for (const v of result.violations) {
      findings.push({
        who,
        width: w.label,
        path,
        rule: v.id,
        impact: v.impact ?? "",
        help: v.help,
        targets: v.nodes.slice(0, 4).map((n) => n.target.join(" ")),
      });
    }
  }
}

const summary = (fs: Finding[]) =>
  fs.map((f) => `${f.who} @${f.width} ${f.path}: ${f.rule} (${f.impact}) ${f.help} — ${f.targets.join(" | ")}`).join("\n");

let params: Params;
test.beforeAll(async ({ browser }) => {
  test.setTimeout(300_000);
  params = await lookUpParams(browser);
});

for (const [role, email] of Object.entries(PEOPLE)) {
  test(`every page as ${role}, at 1366 and 768 px: no WCAG 2.1 A/AA violation`, async ({ browser }) => {
    test.setTimeout(900_000); // about 2 min on a quiet machine; the shared one can be ten times slower
    const context = await browser.newContext();
    const page = await context.newPage();
    await signIn(page, email);
    const before = findings.length;
    for (const path of [...PAGES.map((p) => fill(p, params)), "/no-such-page"]) {
      await page.goto(path);
      // A page that sends this person elsewhere (sign-in when signed in, the editor of another's
      // draft) shows a page audited at its own address.
      if (new URL(page.url()).pathname !== new URL(path, page.url()).pathname) continue;
      await settle(page);
      await audit(page, role, path);
    }
    expect(summary(findings.slice(before)), `${role}: axe violations`).toBe("");
    await context.close();
  });
}

test("every public page, signed out, at 1366 and 768 px: no WCAG 2.1 A/AA violation", async ({ browser }) => {
  test.setTimeout(300_000);
  const context = await browser.newContext();
  const page = await context.newPage();
  const before = findings.length;
  let publicPages = 0;
  for (const path of PAGES.map((p) => fill(p, params))) {
    await page.goto(path);
    // A page that needs a session sends the visitor to sign in: the sign-in page is audited once, as itself.
    if (new URL(page.url()).pathname === "/signin" && path !== "/signin") continue;
    publicPages++;
    await settle(page);
    await audit(page, "anonymous", path);
  }
  expect(publicPages).toBeGreaterThanOrEqual(4); // sign-in, reset, an invitation, a reset link
  expect(summary(findings.slice(before)), "anonymous: axe violations").toBe("");
});

test.afterAll(() => {
  // For the run's log: how much was checked and what was found.
  console.log(
    `accessibility: ${PAGES.length} pages of the route config (+ the not-found page), ${checked.count} page × role × width checks, ${findings.length} violations`,
  );
  if (findings.length) console.log(summary(findings));
});
