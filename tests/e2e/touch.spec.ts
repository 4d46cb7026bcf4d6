// Touch targets on the tablet, measured.
import { expect, test } from "@playwright/test";
import { DEMO_PEOPLE, DEMO_PROCEDURE as STUDS, DEMO_RECORDING, signIn } from "../support/browser";

// Touch targets on the tablet (WCAG 2.5.5, 44 × 44 CSS px): buttons, the menu's links and form
// controls on the main pages at 768 px. A checkbox or radio is measured by its label, which
// toggles it. Links inside running text are exempt (2.5.5's "inline" exception: their size is
// set by the line of text), so only links in a nav are measured here. Visually hidden controls
// (1 px, reached through a visible label or drop zone) are not targets.
const TOUCH_PAGES = [
  "/",
  "/procedures",
  `/procedures/${STUDS}`,
  "/recordings",
  `/recordings/${DEMO_RECORDING}`,
  "/test-records",
  "/test-records/new",
  "/calculators",
  "/calculators/preload",
  "/calculators/distortion",
  "/calculators/clearance",
  "/search?q=head+stud",
  "/account",
  "/admin/people",
];

test("touch targets on the tablet (768 px) are at least 44 px on the main pages", async ({ browser }) => {
  test.setTimeout(600_000);
  const context = await browser.newContext({ viewport: { width: 768, height: 1024 } });
  const page = await context.newPage();
  await signIn(page, DEMO_PEOPLE.admin);
  const small: string[] = [];
  let measured = 0;
  for (const path of TOUCH_PAGES) {
    await page.goto(path);
    await page.waitForLoadState("networkidle", { timeout: 5_000 }).catch(() => {});
    const found = await page.evaluate(() => {
      const out: { what: string; w: number; h: number }[] = [];
      const sel = 'button, [role="button"], [role="tab"], a.btn, select, textarea, input:not([type="hidden"]), nav a';
      for (const el of document.querySelectorAll<HTMLElement>(sel)) {
        let target: HTMLElement = el;
        if (el instanceof HTMLInputElement && (el.type === "checkbox" || el.type === "radio"))
          target = el.closest("label") ?? el.labels?.[0] ?? el;
        const r = target.getBoundingClientRect();
        const cs = getComputedStyle(target);
        if (r.width <= 1 || r.height <= 1 || cs.visibility === "hidden" || target.closest("[hidden], [aria-hidden='true']")) continue;
        const name = (
          el.getAttribute("aria-label") ||
          el.textContent ||
          (el as HTMLInputElement).labels?.[0]?.textContent ||
          el.getAttribute("name") ||
          ""
        )
          .trim()
          .replace(/\s+/g, " ")
          .slice(0, 40);
        out.push({
          what: `${el.tagName.toLowerCase()}${el.getAttribute("type") ? `[${el.getAttribute("type")}]` : ""} “${name}”`,
          w: Math.round(r.width * 10) / 10,
          h: Math.round(r.height * 10) / 10,
        });
      }
      return out;
    });
    measured += found.length;
    for (const f of found) if (f.w < 44 || f.h < 44) small.push(`${path}: ${f.what} ${f.w}×${f.h}`);
  }
  console.log(`touch targets: ${measured} measured on ${TOUCH_PAGES.length} pages at 768 px, ${small.length} under 44 px`);
  expect(measured).toBeGreaterThan(100);
  expect(small.join("\n"), "targets under 44 × 44 px").toBe("");
  await context.close();
});
