// Verdicts and numbers that can be trusted (issue 14 §3), in the browser: Bore distortion loads
// without a hydration error for metric and inch people and labels every depth in the unit shown;
// results open in the units of the readings; a clearance verdict says what it judges and a hot
// clearance near zero is a warning of its own; filing an out-of-spec record confirms it in red.
import { randomUUID } from "node:crypto";
import { expect, test, type Page } from "@playwright/test";
import pg from "pg";
import { signIn as signInAs } from "../support/browser";
import { makeBuild } from "../support/build-fixture";

async function signIn(page: Page, email: string, path: string) {
  await signInAs(page, email);
  await page.goto(path);
}

/** Console errors and uncaught page errors from now on (React reports a hydration mismatch as both). */
function errorsOf(page: Page): string[] {
  const errors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(m.text());
  });
  page.on("pageerror", (e) => errors.push(e.message));
  return errors;
}

for (const [who, email] of [
  ["a metric", "dana@larkspur.example"],
  ["an inch", "marcus@larkspur.example"],
] as const) {
  test(`Bore distortion loads without a hydration error for ${who} person`, async ({ page }) => {
    await signIn(page, email, "/calculators/distortion");
    const errors = errorsOf(page);
    await page.reload();
    // Hydrated: the no-JS "Calculate" button is gone, the live result is drawn.
    await expect(page.getByRole("button", { name: "Calculate" })).toHaveCount(0);
    await expect(page.getByTestId("bore-polar")).toHaveCount(3);
    await page.getByLabel("Compare with a second state").click(); // an interaction after hydration
    await page.getByLabel("Compare with a second state").click();
    await expect(page.getByTestId("bore-polar")).toHaveCount(3);
    expect(errors).toEqual([]);
  });
}

test("Bore distortion in inches: every depth label says inches; results open in the readings' units", async ({ page }) => {
  await signIn(page, "marcus@larkspur.example", "/calculators/distortion");
  await expect(page.getByRole("button", { name: "Calculate" })).toHaveCount(0);
  const result = page.getByTestId("calc-result");
  // The demo depths 12, 45, 80 mm typed as 0.472, 1.772, 3.150 in.
  await expect(page.getByLabel("Depths below the deck")).toHaveValue("0.472, 1.772, 3.15");
  await expect(page.getByTestId("bore-polar").first()).toContainText("0.472 in deep");
  await expect(result).not.toContainText("mm deep");
  await expect(page.getByTestId("bore-profile")).toContainText("Depth below the deck (in)");
  await expect(page.getByTestId("bore-profile")).not.toContainText("(mm)");
  await expect(result.getByRole("columnheader", { name: "Depth, in" }).first()).toBeVisible();
  await expect(page.getByLabel("Show diameters in")).toHaveValue("in");
  await expect(page.getByLabel("Show deviations in")).toHaveValue("thou");

  // Readings typed in millimetres show their results in millimetres and micrometres first.
  await page.getByLabel("Unit of the readings").selectOption("mm");
  await expect(page.getByLabel("Show diameters in")).toHaveValue("mm");
  await expect(page.getByLabel("Show deviations in")).toHaveValue("um");
  // and the other system is a click away
  await page.getByLabel("Show deviations in").selectOption("thou");
  await expect(page.getByLabel("Show deviations in")).toHaveValue("thou");
});

test("Clearances: the verdict names the cold clearance; a hot clearance near zero is a red warning of its own", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/clearance");
  await expect(page.getByTestId("result-hot")).toBeVisible();
  // Bore 88.000 at the default temperatures; a piston this close gives a hot clearance near zero
  // while the cold one (0.035 mm) is within a 0.02–0.08 mm spec.
  await page.getByLabel("Piston at the gauge point", { exact: true }).fill("87.965");
  const hot = Number(
    await page
      .getByTestId("result-hot")
      .innerText()
      .then((t) => t.replace(/[^\d.-]/g, "")),
  );
  expect(hot).toBeLessThan(0.022);
  await expect(page.getByTestId("hot-verdict")).toBeVisible();
  await expect(page.getByTestId("hot-verdict")).toHaveClass(/text-spec-red/);
  await expect(page.getByTestId("calc-warnings")).toContainText(/Hot clearance is (near zero|negative)/);
  await expect(page.getByTestId("clearance-verdict")).toContainText(/^Cold clearance /);
});

async function makeProcedure(): Promise<{ slug: string }> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    const slug = `torque-check-${randomUUID().slice(0, 8)}`;
    const title = `Head stud torque check ${slug.slice(-4)}`;
    const doc = {
      type: "doc",
      content: [{ type: "paragraph", content: [{ type: "text", text: "Torque the studs in three steps; record the final torque." }] }],
    };
    const p = await client.query(`insert into procedures (slug, title, area) values ($1, $2, 'fasteners') returning id`, [slug, title]);
    const r = await client.query(
      `insert into procedure_revisions (procedure_id, number, state, title, area, doc, published_at) values ($1, 1, 'published', $2, 'fasteners', $3, now()) returning id`,
      [p.rows[0].id, title, JSON.stringify(doc)],
    );
    await client.query(
      `insert into procedure_specs (revision_id, procedure_id, spec_key, position, label, quantity, unit, nominal, min, max, si_unit) values ($1,$2,'final',0,'Head stud final torque','torque','N.m',110,105,115,'N.m'), ($1,$2,'stretch',1,'Stud stretch','length','mm',null,0.15,0.2,'m')`,
      [r.rows[0].id, p.rows[0].id],
    );
    await client.query(`update procedures set published_revision_id = $1, published_at = now() where id = $2`, [
      r.rows[0].id,
      p.rows[0].id,
    ]);
    return { slug };
  } finally {
    await client.end();
  }
}

test("Filing an out-of-spec record confirms it in red; a converted reading shows at the resolution typed", async ({ page }) => {
  const { slug } = await makeProcedure();
  await signIn(page, "tomas@larkspur.example", `/test-records/new`);
  // The build first: the form lists the builds there are when it opens.
  const wo = await makeBuild("LEW-24-0911");
  await page.goto(`/test-records/new?procedure=${slug}`);
  await page.getByLabel("Build (work order)").selectOption(wo);
  await page.getByLabel("Head stud final torque reading 1", { exact: true }).fill("90");
  await page.getByLabel("Head stud final torque reading 1 unit", { exact: true }).selectOption("ft.lbf");
  await page.getByRole("button", { name: "File the test record" }).click();
  await page.waitForURL(/\/test-records\/[0-9a-f-]{36}$/);
  const flash = page.getByTestId("flash");
  await expect(flash).toContainText("Out of spec; 1 spec not measured");
  await expect(flash).toHaveAttribute("data-kind", "out");
  await expect(flash).toHaveClass(/text-spec-red/);
  await expect(flash).not.toHaveClass(/bg-ok-soft/);
  // 90 ft·lbf = 122.02 N·m (1 ft·lbf = 1.3558179 N·m, NIST SP 811): one step of 1 ft·lbf is 1.36 N·m, so "122 N·m".
  const row = page.getByTestId("spec-row").filter({ hasText: "Head stud final torque" });
  await expect(row).toContainText("122 N·m");
  await expect(row).not.toContainText("122.0");
});

test("A recording's reading typed 88.010 shows 88.010, after saving, after a reload and in its edit line", async ({ page }) => {
  await signIn(page, "marcus@larkspur.example", "/recordings");
  await page.getByTestId("recording-card").filter({ hasText: "Head stud clamp-load test" }).getByRole("link").first().click();
  const grid = page.getByTestId("readings-grid");
  // A cylinder of its own, so this test's row is told from the others' on the shared recording.
  const cyl = String(5 + Math.floor(Math.random() * 19));
  await grid.getByLabel("Line 1 quantity").selectOption("bore-diameter");
  await grid.getByLabel("Line 1 cylinder").fill(cyl);
  await grid.getByLabel("Line 1 depth below deck").fill("20");
  await grid.getByLabel("Line 1 angle (°)").fill("90");
  await grid.getByLabel("Line 1 value").fill("88.010");
  await grid.getByLabel("Line 1 label").fill(`resolution check ${cyl}`);
  await page.getByTestId("save-readings").click();
  const row = page.getByTestId("reading-row").filter({ hasText: `resolution check ${cyl}` });
  await expect(row).toContainText("88.010 mm");
  await page.reload();
  await expect(row).toContainText("88.010 mm");
  await expect(row).not.toContainText("88.01 mm");
  if (process.env.SHOTS_TR) {
    for (const [w, width] of [
      ["desktop", 1366],
      ["tablet", 768],
    ] as const) {
      await page.setViewportSize({ width, height: 1000 });
      await row.scrollIntoViewIfNeeded();
      await page.screenshot({ path: `${process.env.SHOTS_TR}/recording-readings-${w}.png`, fullPage: true });
    }
    await page.setViewportSize({ width: 1366, height: 900 });
  }
  await row.getByRole("button", { name: "Edit" }).click();
  await expect(page.getByLabel("Reading value")).toHaveValue("88.010");
});
