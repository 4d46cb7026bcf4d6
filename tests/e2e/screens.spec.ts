// Not a test: with SCREENSHOTS=<dir> it saves each screen at desktop and tablet width for a
// person to look at.  SCREENSHOTS=/tmp/shots npm test -- --only e2e tests/e2e/screens.spec.ts
// Without SCREENSHOTS the Playwright config leaves this file out of the suite.
import fs from "node:fs";
import { test } from "@playwright/test";

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
  ...(process.env.SCREENS_EXTRA ? (JSON.parse(process.env.SCREENS_EXTRA) as Screen[]) : []),
];


for (const s of SCREENS) {
  test(`screen ${s.name}`, async ({ browser }) => {
    fs.mkdirSync(dir!, { recursive: true });
    for (const [label, width] of [["desktop", 1280], ["tablet", 768]] as const) {
      const ctx = await browser.newContext({ viewport: { width, height: 1000 } });
      const page = await ctx.newPage();
      if (s.as) {
        await page.goto("/signin");
        await page.getByLabel("E-mail").fill(s.as);
        await page.getByLabel("Password").fill("larkspur-demo");
        await page.getByRole("button", { name: "Sign in" }).click();
        await page.waitForURL((u) => !u.pathname.startsWith("/signin"));
      }
      await page.goto(s.path);
      await page.waitForLoadState("networkidle");
      if (s.type) {
        await page.locator("#header-search").pressSequentially(s.type);
        await page.getByTestId("search-hit").first().waitFor();
      }
      await page.screenshot({ path: `${dir}/${s.name}-${label}.png`, fullPage: true });
      await ctx.close();
    }
  });
}
