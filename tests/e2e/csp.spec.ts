// The pages' Content-Security-Policy in the browser (app/lib/csp.server.ts): a script injected
// into a page does not run, every response has its own nonce (read-page cache hits included),
// and the screens that bring their own scripts and styles (video.js, TipTap, charts) work
// without a single report of a refused resource.
import { expect, test, type Page } from "@playwright/test";

const DEMO_RECORDING = "5eed0000-0000-4000-8000-00000000c1a9";
const STUDS = "/procedures/head-stud-installation-and-torque-sequence";

type Violation = { directive: string; blocked: string; sample: string; page: string };
declare global {
  interface Window {
    __violations?: Violation[];
    __injectedRan?: boolean;
  }
}

/** Collects every CSP report of the page (in the page, from before its first script) and every console message about one. */
async function watchViolations(page: Page) {
  await page.addInitScript(() => {
    window.__violations = [];
    document.addEventListener("securitypolicyviolation", (e) =>
      window.__violations!.push({ directive: e.effectiveDirective, blocked: e.blockedURI, sample: e.sample, page: location.pathname }),
    );
  });
  const console: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to/i.test(m.text())) console.push(`${page.url()}: ${m.text()}`);
  });
  return {
    console,
    async reported(): Promise<Violation[]> {
      return page.evaluate(() => window.__violations ?? []);
    },
  };
}

async function signIn(page: Page, email: string) {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("user-name")).toBeVisible();
}

const nonceOf = (policy: string | undefined) => policy?.match(/'nonce-([^']+)'/)?.[1];

test("a script injected into a page is refused, and each response has its own nonce", async ({ page }) => {
  const watch = await watchViolations(page);
  await signIn(page, "jamie@larkspur.example");

  const first = await page.goto(STUDS);
  const policy = first!.headers()["content-security-policy"];
  expect(policy).toContain("default-src 'self'");
  expect(policy).toContain("object-src 'none'");
  const nonce = nonceOf(policy)!;
  expect(nonce).toMatch(/^[A-Za-z0-9+/]{22}==$/);
  // React Router's scripts carry it (the browser hides the attribute, not the property).
  const scriptNonces = await page.locator("script[nonce]").evaluateAll((els) => els.map((e) => (e as HTMLScriptElement).nonce));
  expect(scriptNonces.length).toBeGreaterThan(0);
  expect(new Set(scriptNonces)).toEqual(new Set([nonce]));
  await expect(page.getByTestId("procedure-body")).toBeVisible();

  // An inline script without the nonce, an inline event handler, and a script from elsewhere.
  await page.evaluate(() => {
    const s = document.createElement("script");
    s.textContent = "window.__injectedRan = true";
    document.body.appendChild(s);
    const holder = document.createElement("div");
    holder.innerHTML = `<img src="/favicon.svg?x" onload="window.__injectedRan = true">`;
    document.body.appendChild(holder);
    const remote = document.createElement("script");
    remote.src = "https://elsewhere.example/x.js";
    document.body.appendChild(remote);
  });
  await expect
    .poll(async () => (await watch.reported()).map((v) => v.directive).sort())
    .toEqual(["script-src-attr", "script-src-elem", "script-src-elem"]);
  expect(await page.evaluate(() => window.__injectedRan ?? false)).toBe(false);
  const reported = await watch.reported();
  expect(reported.find((v) => v.blocked === "inline" && v.directive === "script-src-elem")).toBeTruthy();
  expect(reported.find((v) => v.blocked.startsWith("https://elsewhere.example"))).toBeTruthy();

  // The same page again has a nonce of its own that its scripts carry: the page still hydrates
  // (the watch button answers) and nothing is refused.
  const again = await page.goto(STUDS);
  const nonce2 = nonceOf(again!.headers()["content-security-policy"])!;
  expect(nonce2).not.toBe(nonce);
  expect(again!.headers()["content-security-policy"].split(`'nonce-${nonce2}'`)).toHaveLength(3); // scripts and styles
  const scriptNonces2 = await page.locator("script[nonce]").evaluateAll((els) => els.map((e) => (e as HTMLScriptElement).nonce));
  expect(new Set(scriptNonces2)).toEqual(new Set([nonce2]));
  const toggle = page.getByTestId("watch-toggle");
  const pressed = await toggle.getAttribute("aria-pressed");
  await toggle.click();
  await expect(toggle).not.toHaveAttribute("aria-pressed", pressed!);
  await toggle.click();
  await expect(toggle).toHaveAttribute("aria-pressed", pressed!);
  expect(await watch.reported()).toEqual([]);
});

test("static files and API answers carry the strict static policy", async ({ request }) => {
  for (const path of ["/favicon.svg", "/api/me", "/healthz"]) {
    const res = await request.get(path);
    const policy = res.headers()["content-security-policy"];
    expect(policy, path).toContain("default-src 'none'");
    expect(policy, path).toContain("frame-ancestors 'none'");
    expect(policy, path).not.toContain("nonce-");
  }
});

test("a video or an image opened on its own still shows under the static policy", async ({ page }) => {
  const watch = await watchViolations(page);
  await signIn(page, "jamie@larkspur.example");
  const res = await page.goto(`/api/recordings/${DEMO_RECORDING}/media`);
  expect(res!.headers()["content-security-policy"]).toContain("default-src 'none'");
  await expect
    .poll(() => page.locator("video").evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 15_000 })
    .toBeGreaterThanOrEqual(1);
  await page.goto("/favicon.svg");
  await expect(page.locator("svg")).toBeVisible();
  expect(watch.console).toEqual([]);
});

test("every screen works under the policy: player, editor, charts, search, admin — nothing refused", async ({ browser }) => {
  test.setTimeout(120_000);
  const context = await browser.newContext();
  const page = await context.newPage();
  const watch = await watchViolations(page);
  await signIn(page, "dana@larkspur.example");
  const seen: Violation[] = [];
  const visit = async (path: string, ready: () => Promise<void>) => {
    await page.goto(path);
    await ready();
    seen.push(...(await watch.reported()));
  };

  await visit("/", () => expect(page.getByTestId("user-name")).toBeVisible());
  await visit("/procedures", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit(STUDS, () => expect(page.getByTestId("procedure-body")).toBeVisible());
  await visit(`${STUDS}/history`, () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit(`${STUDS}/compare?from=1&to=2`, () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit(`${STUDS}/print`, () => expect(page.locator(".proc-body")).toBeVisible());
  // The demo's open run (scripts/seed/runs.ts): the run screen with its calculator and the device's queue.
  await visit("/runs/5eed0000-0000-4000-8000-00000000a001", () => expect(page.getByTestId("save-state")).toBeVisible());

  // The player: video.js loads, sizes itself from its class and plays the seeded clip.
  await visit(`/recordings/${DEMO_RECORDING}`, async () => {
    const video = page.locator("video").first();
    await expect(video).toBeAttached({ timeout: 30_000 });
    await expect.poll(() => video.evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 30_000 }).toBeGreaterThanOrEqual(1);
    const box = await page.locator("video-js").boundingBox();
    expect(box!.height).toBeGreaterThan(box!.width * 0.5);
    await expect(page.locator(".br-mark-ticks .br-tick").first()).toBeAttached();
  });
  await visit("/recordings", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/recordings/upload", () => expect(page.getByTestId("file-input")).toBeAttached());

  // Charts.
  for (const calc of ["preload", "distortion", "clearance"]) {
    await visit(`/calculators/${calc}`, async () => {
      await expect(page.getByRole("button", { name: "Calculate" })).toHaveCount(0);
      await expect(page.locator("svg").first()).toBeVisible();
    });
  }
  await visit("/test-records", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/test-records/new", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/builds", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/builds/LEW-24-0117", () => expect(page.getByTestId("timeline-entry").first()).toBeVisible());
  await visit("/builds/LEW-24-0117/sheet", () => expect(page.getByTestId("build-sheet")).toBeVisible());
  await visit("/search?q=head+stud", () => expect(page.getByTestId("search-result").first()).toBeVisible());
  await visit("/search/words", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/admin/people", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/account", () => expect(page.getByRole("heading", { level: 1 })).toBeVisible());
  await visit("/no-such-page", () => expect(page.getByText("Nothing at this address")).toBeVisible());

  // The editor: TipTap's base styles arrive (with the nonce) and typing works.
  await visit("/procedures/new", () => expect(page.getByLabel("Title")).toBeVisible());
  await page.getByLabel("Title").fill(`CSP editor check ${Date.now().toString(36)}`);
  await page.getByRole("button", { name: "Start the draft" }).click();
  await expect(page).toHaveURL(/\/r\/1\/edit$/);
  const editor = page.getByTestId("editor");
  await expect(editor).toBeVisible();
  await editor.locator("p").first().click();
  await page.keyboard.type("Typed under the policy.");
  await expect(editor).toContainText("Typed under the policy.");
  await expect(page.locator("style[data-tiptap-style]")).toBeAttached();
  // Only TipTap's injected style sets this (the app's CSS does not): the nonce let it in.
  expect(await editor.evaluate((el) => getComputedStyle(el).whiteSpace)).toBe("break-spaces");
  seen.push(...(await watch.reported()));

  expect(seen).toEqual([]);
  expect(watch.console).toEqual([]);
  await context.close();
});
