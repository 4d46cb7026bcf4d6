// Every screen below opens with its heading and fits the desktop (1366 px) and the tablet
// (768 px) without scrolling sideways (a wide table scrolls inside its card, never the page).
// With SCREENSHOTS=<dir> each screen is also saved there at both widths, for a person to look at:
//   SCREENSHOTS=/tmp/shots npm test -- --only e2e tests/e2e/screens.spec.ts
// SCREENS_EXTRA='[{"name":"x","path":"/procedures","as":"jamie@larkspur.example"}]' adds screens
// for one run (held to the same checks).
import fs from "node:fs";
import { expect, test } from "@playwright/test";
import { signIn } from "../support/browser";

const dir = process.env.SCREENSHOTS;
type Screen = { name: string; path: string; as?: string; type?: string };
const SCREENS: Screen[] = [
  { name: "signin", path: "/signin" },
  { name: "reset", path: "/reset" },
  { name: "shop-floor-admin", path: "/", as: "dana@larkspur.example" },
  { name: "shop-floor-apprentice", path: "/", as: "jamie@larkspur.example" },
  { name: "account", path: "/account", as: "marcus@larkspur.example" },
  { name: "people", path: "/admin/people", as: "dana@larkspur.example" },
  { name: "outbox", path: "/admin/outbox", as: "dana@larkspur.example" },
  { name: "forbidden", path: "/admin/people", as: "jamie@larkspur.example" },
  { name: "not-found", path: "/no-such-page", as: "jamie@larkspur.example" },
  { name: "search-dropdown", path: "/", as: "jamie@larkspur.example", type: "head stud torque" },
  { name: "search-words", path: "/search/words", as: "priya@larkspur.example" },
  { name: "search-empty-editor", path: "/search", as: "priya@larkspur.example" },
  { name: "builds", path: "/builds", as: "marcus@larkspur.example" },
  { name: "build-out-of-spec", path: "/builds/LEW-24-0119", as: "jamie@larkspur.example" },
  { name: "build-sheet", path: "/builds/LEW-24-0117/sheet", as: "tomas@larkspur.example" },
  { name: "run-tablet", path: "/runs/5eed0000-0000-4000-8000-00000000a001", as: "marcus@larkspur.example" },
  { name: "run-start", path: "/runs/start", as: "marcus@larkspur.example" },
  ...(process.env.SCREENS_EXTRA ? (JSON.parse(process.env.SCREENS_EXTRA) as Screen[]) : []),
];

const WIDTHS = [
  ["desktop", { width: 1366, height: 900 }],
  ["tablet", { width: 768, height: 1024 }],
] as const;

for (const s of SCREENS) {
  test(`screen ${s.name} has its heading and fits the desktop and the tablet`, async ({ browser }) => {
    if (dir) fs.mkdirSync(dir, { recursive: true });
    for (const [label, viewport] of WIDTHS) {
      const ctx = await browser.newContext({ viewport });
      const page = await ctx.newPage();
      if (s.as) await signIn(page, s.as);
      await page.goto(s.path);
      await page.waitForLoadState("networkidle");
      if (s.type) {
        await page.locator("#header-search").pressSequentially(s.type);
        await page.getByTestId("search-hit").first().waitFor();
      }
      // Saved before the checks, and the checks are soft: a screen that fails is still there to look at, at both widths.
      if (dir) await page.screenshot({ path: `${dir}/${s.name}-${label}.png`, fullPage: true });
      await expect.soft(page.getByRole("heading", { level: 1 }).first(), `${s.name} at ${label}: a heading`).toBeVisible();
      const sideways = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect.soft(sideways, `${s.name} scrolls sideways by ${sideways} px at ${viewport.width} px`).toBeLessThanOrEqual(0);
      await ctx.close();
    }
  });
}
