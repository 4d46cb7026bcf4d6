// A run worked on the tablet (768×1024): started from the procedure's page, stepped through
// one screen at a time, values kept as they are typed; the network cut in the middle
// (Playwright's offline mode), entries typed meanwhile wait on the device and the screen says
// so; the network back, they are sent once; finishing files the test record. A bore beside a
// Bore distortion calculator is read in its grid, cylinder by cylinder, with the cylinder's
// distortion shown as typed; a cylinder's diameters and a photo taken with the network cut
// wait on the tablet and go once; a photo the server refuses is discarded from the tablet; the
// filed record and the build sheet say where each diameter was read.
import { randomUUID } from "node:crypto";
import AxeBuilder from "@axe-core/playwright";
import { expect, test } from "@playwright/test";
import pg from "pg";
import { DEMO_PEOPLE, DEMO_PROCEDURE, signIn } from "../support/browser";

test.use({ viewport: { width: 768, height: 1024 } });

/** A real picture, 2 × 2 grey pixels (PNG). */
const GRAY_PNG = Buffer.from("iVBORw0KGgoAAAANSUhEUgAAAAIAAAACCAAAAABX3VL4AAAADklEQVR4nGNoaGBoaAAABgYCASzBUNcAAAAASUVORK5CYII=", "base64");

/** A build of our own on the bench, made directly (as integration tests make their data). */
async function benchBuild(cylinders: number | null = null): Promise<string> {
  const number = `LEW-26-${String(Math.floor(Math.random() * 90000) + 10000)}`;
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query(
      "insert into builds (id, number, customer_name, engine, engine_serial, status, cylinders) values ($1, $2, 'Run test customer', 'Inline four, 2.3 L', $3, 'on_bench', $4)",
      [randomUUID(), number, `RT-${number.slice(-5)}`, cylinders],
    );
  } finally {
    await client.end();
  }
  return number;
}

async function count(sql: string, params: unknown[]): Promise<number> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    return (await client.query(sql, params)).rows[0].n as number;
  } finally {
    await client.end();
  }
}
const entriesOf = (runId: string, specKey: string) =>
  count("select count(*)::int as n from run_entries where run_id = $1 and spec_key = $2", [runId, specKey]);

test("a whole run on the tablet, with the network cut in the middle", async ({ page, context }) => {
  const build = await benchBuild();
  await signIn(page, DEMO_PEOPLE.builder);
  await page.goto(`/procedures/${DEMO_PROCEDURE}`);
  await page.getByTestId("start-run").click();
  await expect(page.getByRole("heading", { name: "Start a run" })).toBeVisible();
  await page.getByLabel("Build (work order)").selectOption(build);
  await page.getByRole("button", { name: "Start the run" }).click();
  await expect(page).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
  const runId = page.url().split("/").pop()!;

  // One step at a time, the procedure's cautions in front of every one.
  const step = page.getByTestId("run-step");
  await expect(step.getByRole("note", { name: "Caution" })).toContainText("take precedence");
  // The torque is one value per stud: stud 1's field.
  const torque = page.getByLabel("Stud 1, Head stud final torque", { exact: true });
  for (let i = 0; i < 20 && !(await torque.isVisible()); i++) await page.getByRole("button", { name: "Next →" }).click();
  await expect(torque).toBeVisible();

  // The verdict as the number is typed; the calculator takes the torque just typed.
  await torque.pressSequentially("118");
  await expect(page.getByTestId("entry").filter({ has: torque }).getByTestId("entry-verdict")).toHaveText(/Out: above max/);
  await torque.fill("110");
  await expect(page.getByTestId("entry").filter({ has: torque }).getByTestId("entry-verdict")).toHaveText("Within");
  await expect(page.getByTestId("step-calculator")).toContainText("torque ← Head stud final torque (Stud 1)");
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.");

  // The network goes: what is typed now waits on the tablet, and the screen says so.
  await context.setOffline(true);
  const protrusion = page.getByLabel("Stud 1, Stud protrusion above deck", { exact: true });
  await protrusion.fill("52.10");
  await expect(page.getByTestId("save-state")).toContainText("No network: 1 entry is waiting on this device");
  await expect(page.getByTestId("save-state")).toHaveAttribute("data-waiting", "1");
  expect(await entriesOf(runId, "studs-protrusion")).toBe(0);

  // The network is back: sent, once.
  await context.setOffline(false);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  expect(await entriesOf(runId, "studs-protrusion")).toBe(1);

  // A reload while an entry waits on the tablet (the server out of reach for entries) loses
  // nothing: the page shows it from the device's queue, and sends it, once, when it can.
  const entriesApi = `**/api/runs/${runId}/entries`;
  await page.route(entriesApi, (route) => route.abort("internetdisconnected"));
  await protrusion.fill("52.20");
  await expect(page.getByTestId("save-state")).toHaveAttribute("data-waiting", "1");
  await page.reload();
  await expect(page.getByLabel("Stud 1, Stud protrusion above deck", { exact: true })).toHaveValue("52.20");
  await expect(page.getByTestId("save-state")).toHaveAttribute("data-waiting", "1");
  expect(await entriesOf(runId, "studs-protrusion")).toBe(1);
  await page.unroute(entriesApi);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  expect(await entriesOf(runId, "studs-protrusion")).toBe(2);

  // Picked up on another device: the server holds the values and the step.
  const other = await context.browser()!.newContext({ viewport: { width: 768, height: 1024 } });
  const tablet2 = await other.newPage();
  await signIn(tablet2, DEMO_PEOPLE.qc);
  await tablet2.goto(`/runs/${runId}`);
  await expect(tablet2.getByLabel("Stud 1, Stud protrusion above deck", { exact: true })).toHaveValue("52.20");
  await other.close();
  expect(await entriesOf(runId, "studs-protrusion")).toBe(2);

  // Finishing files the record against the run's revision.
  await expect(page.getByTestId("run-progress")).toHaveText("2 of 2 measured");
  await page.getByLabel("Notes for the record (optional)").fill("Worked on the bench tablet.");
  // Each per-stud spec covers as many studs as were worked here: one.
  for (const count of await page.getByTestId("stud-count").getByRole("spinbutton").all()) await count.fill("1");
  await page.getByRole("button", { name: "Finish and file the test record" }).click();
  await expect(page).toHaveURL(/\/test-records\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId("verdict").first()).toHaveText(/Within spec/);
  await expect(page.locator("main")).toContainText(build);
  await expect(page.locator("main")).toContainText("52.20");
  await expect(page.locator("main")).toContainText("Worked on the bench tablet.");
});

test("a bore read in its Bore distortion grid cylinder by cylinder, with the network cut, a photo refused and discarded, and the places on the record and the sheet", async ({
  page,
  context,
}) => {
  const build = await benchBuild(4);
  await signIn(page, DEMO_PEOPLE.builder);
  await page.goto("/runs/start");
  await page.getByLabel("Procedure").selectOption({ label: "Torque-plate honing an iron-lined aluminium block" });
  await page.getByLabel("Build (work order)").selectOption(build);
  await page.getByRole("button", { name: "Start the run" }).click();
  await expect(page).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
  const runId = page.url().split("/").pop()!;
  // The step holds the bore and a Bore distortion calculator: the bore is asked in the
  // calculator's grid, 10, 50 and 90 mm down at 0°, 45°, 90° and 135°, one cylinder at a time.
  const cell = (n: number, depth: number, angle: number) =>
    page.getByLabel(`Cyl ${n}, ${depth} mm down, ${angle}°, Bore diameter, plate fitted`, { exact: true });
  for (let i = 0; i < 20 && !(await cell(1, 10, 0).isVisible()); i++) await page.getByRole("button", { name: "Next →" }).click();
  const bore = page.getByTestId("entry").filter({ has: page.getByTestId("bore-grid") });
  await expect(bore.getByTestId("bore-grid")).toHaveAttribute("data-cylinder", "1");
  await expect(bore.getByTestId("grid-cell")).toHaveCount(12);

  // Each diameter is judged against the bore's limits as it is typed.
  await cell(1, 10, 45).fill("88.012");
  await expect(bore.getByTestId("grid-cell").nth(1).getByTestId("entry-verdict")).toHaveText(/Out: above max/);
  await expect(page.getByTestId("partial-grids")).toContainText("Bore diameter, plate fitted, Cyl 1 (1 of 12)");
  // Kept as typed (then corrected below: the later typing at that place wins).
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  const typeCylinder = async (n: number, top: number[], mid: number[], low: number[]) => {
    for (const [j, a] of [0, 45, 90, 135].entries()) {
      await cell(n, 10, a).fill(top[j].toFixed(3));
      await cell(n, 50, a).fill(mid[j].toFixed(3));
      await cell(n, 90, a).fill(low[j].toFixed(3));
    }
  };
  await typeCylinder(1, [88.006, 88.009, 88.008, 88.003], [88.004, 88.008, 88.007, 88.001], [88.005, 88.007, 88.006, 88.004]);
  await expect(bore.getByTestId("grid-cell").nth(1).getByTestId("entry-verdict")).toHaveText("Within");
  await expect(page.getByTestId("partial-grids")).toHaveCount(0);
  // The cylinder's distortion from these numbers: out-of-round is the largest minus the smallest
  // diameter at a depth (88.009 − 88.003, 88.008 − 88.001, 88.007 − 88.004), taper the spread of the
  // depths' means (88.0065 at 10 mm − 88.005 at 50 mm; 88.0055 at 90 mm lies between).
  const result = bore.getByTestId("step-calculator");
  await expect(result).toContainText("Bore distortion — Cyl 1");
  await expect(result).toContainText("Diameters (12 of 12) ← Bore diameter, plate fitted, Cyl 1");
  await expect(result).toContainText(/Out-of-round at 10 mm\s*6 µm/);
  await expect(result).toContainText(/Out-of-round at 50 mm\s*7 µm/);
  await expect(result).toContainText(/Out-of-round at 90 mm\s*3 µm/);
  await expect(result).toContainText(/Taper\s*1\.5 µm/);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  expect(await entriesOf(runId, "bore-dia")).toBe(13);
  // The grid and its result are read out as a table with named fields (WCAG 2.1 A and AA, as the accessibility suite checks pages).
  const axe = await new AxeBuilder({ page })
    .include('[data-testid="run-step"]')
    .withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"])
    .analyze();
  expect(axe.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`)).toEqual([]);

  // Next cylinder. The network goes: its diameters and a photo of cylinder 3's gauge wait on the tablet.
  await bore.getByRole("button", { name: "Next cylinder →" }).click();
  await expect(bore.getByTestId("bore-grid")).toHaveAttribute("data-cylinder", "2");
  await expect(result).toContainText("Type this cylinder's diameters");
  await context.setOffline(true);
  await typeCylinder(2, [88.005, 88.008, 88.006, 88.003], [88.004, 88.007, 88.006, 88.002], [88.004, 88.006, 88.005, 88.003]);
  await bore.getByLabel("Photo of").selectOption({ label: "Cyl 3" });
  await bore.locator('input[type="file"]').setInputFiles({ name: "gauge.png", mimeType: "image/png", buffer: GRAY_PNG });
  await expect(page.getByTestId("save-state")).toContainText("No network: 12 entries and 1 photo are waiting on this device");
  await expect(bore.getByTestId("photo-waiting")).toHaveCount(1);
  expect(await entriesOf(runId, "bore-dia")).toBe(13);

  // Back: everything goes, once.
  await context.setOffline(false);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  await expect(bore.getByTestId("photo-sent")).toHaveCount(1);
  expect(await entriesOf(runId, "bore-dia")).toBe(25);
  expect(await count("select count(*)::int as n from run_photos where run_id = $1 and cylinder = 3", [runId])).toBe(1);

  // A file that is not a picture is refused by the server: the screen says why and it can be discarded from the tablet.
  await bore
    .locator('input[type="file"]')
    .setInputFiles({ name: "notes.png", mimeType: "image/png", buffer: Buffer.from("not a picture") });
  const refused = bore.getByTestId("photo-refused");
  await expect(refused).toContainText("Not kept:", { timeout: 15_000 });
  await expect(page.getByTestId("save-state")).toContainText("Some values or photos were refused");
  await refused.getByRole("button", { name: "Discard from this tablet" }).click();
  await expect(refused).toHaveCount(0);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.");

  await page.reload();
  await expect(bore.getByTestId("photo-refused")).toHaveCount(0);
  await bore.getByRole("button", { name: /^Cyl 2 · 12\/12$/ }).click();
  await expect(cell(2, 50, 135)).toHaveValue("88.002");
  expect(await entriesOf(runId, "bore-dia")).toBe(25);

  // Cylinders 3 and 4 and the out-of-round were not measured: the record is filed Incomplete,
  // each diameter with its cylinder, depth and angle, on the record and on the build sheet.
  await page.getByRole("button", { name: "Finish and file the test record" }).click();
  await expect(page).toHaveURL(/\/test-records\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId("verdict").first()).toHaveText(/Incomplete/);
  const boreRows = () => page.getByTestId("spec-row").filter({ hasText: "Bore diameter, plate fitted" }).locator("tr");
  for (const where of ["record", "sheet"]) {
    if (where === "sheet") await page.goto(`/builds/${build}/sheet`);
    await expect(boreRows().filter({ hasText: "cyl 1" })).toHaveCount(12);
    await expect(boreRows().filter({ hasText: "cyl 2" }).filter({ hasText: "50 mm down" }).filter({ hasText: "135°" })).toContainText(
      "88.002",
    );
  }
});
