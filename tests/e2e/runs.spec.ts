// A run worked on the tablet (768×1024): started from the procedure's page, stepped through
// one screen at a time, values kept as they are typed; the network cut in the middle
// (Playwright's offline mode), entries typed meanwhile wait on the device and the screen says
// so; the network back, they are sent once; finishing files the test record. A bore is
// measured per cylinder: four cylinders' values and a photo taken with the network cut wait
// on the tablet, go once, and the filed record and the build sheet say where each was taken.
import { randomUUID } from "node:crypto";
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

  // Picked up on another device: the server holds the values and the step.
  const other = await context.browser()!.newContext({ viewport: { width: 768, height: 1024 } });
  const tablet2 = await other.newPage();
  await signIn(tablet2, DEMO_PEOPLE.qc);
  await tablet2.goto(`/runs/${runId}`);
  await expect(tablet2.getByLabel("Stud 1, Stud protrusion above deck", { exact: true })).toHaveValue("52.10");
  await other.close();
  expect(await entriesOf(runId, "studs-protrusion")).toBe(1);

  // Finishing files the record against the run's revision.
  await expect(page.getByTestId("run-progress")).toHaveText("2 of 2 measured");
  await page.getByLabel("Notes for the record (optional)").fill("Worked on the bench tablet.");
  await page.getByRole("button", { name: "Finish and file the test record" }).click();
  await expect(page).toHaveURL(/\/test-records\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId("verdict").first()).toHaveText(/Within spec/);
  await expect(page.locator("main")).toContainText(build);
  await expect(page.locator("main")).toContainText("52.10");
  await expect(page.locator("main")).toContainText("Worked on the bench tablet.");
});

test("a bore measured per cylinder with the network cut, a photo taken offline, and the positions on the record and the sheet", async ({
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
  const cyl = (n: number) => page.getByLabel(`Cyl ${n}, Bore diameter, plate fitted`, { exact: true });
  for (let i = 0; i < 20 && !(await cyl(1).isVisible()); i++) await page.getByRole("button", { name: "Next →" }).click();

  // One row per cylinder of the engine (the build says 4), each with its own verdict.
  const bore = page.getByTestId("entry").filter({ has: cyl(1) });
  await expect(bore.getByTestId("entry-place")).toHaveCount(4);
  await cyl(1).fill("88.004");
  await cyl(2).fill("88.012");
  await expect(bore.getByTestId("entry-place").nth(1).getByTestId("entry-verdict")).toHaveText(/Out: above max/);
  await cyl(2).fill("88.009");
  await expect(bore.getByTestId("entry-place").nth(1).getByTestId("entry-verdict")).toHaveText("Within");
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });

  // The network goes: two more cylinders and a photo of cylinder 3's gauge wait on the tablet.
  await context.setOffline(true);
  await cyl(3).fill("88.006");
  await cyl(4).fill("88.008");
  await bore.getByLabel("Photo of").selectOption({ label: "Cyl 3" });
  await bore.locator('input[type="file"]').setInputFiles({ name: "gauge.png", mimeType: "image/png", buffer: GRAY_PNG });
  await expect(page.getByTestId("save-state")).toContainText("No network: 2 entries and 1 photo are waiting on this device");
  await expect(bore.getByTestId("photo-waiting")).toHaveCount(1);
  expect(await entriesOf(runId, "bore-dia")).toBe(2);

  // Back: everything goes, once.
  await context.setOffline(false);
  await expect(page.getByTestId("save-state")).toHaveText("Every entry is saved on the server.", { timeout: 15_000 });
  await expect(bore.getByTestId("photo-sent")).toHaveCount(1);
  expect(await entriesOf(runId, "bore-dia")).toBe(4);
  expect(await count("select count(*)::int as n from run_photos where run_id = $1 and cylinder = 3", [runId])).toBe(1);
  await page.reload();
  await expect(cyl(4)).toHaveValue("88.008");
  expect(await entriesOf(runId, "bore-dia")).toBe(4);

  // The out-of-round was not measured: the record is filed Incomplete, with every cylinder's bore.
  await page.getByRole("button", { name: "Finish and file the test record" }).click();
  await expect(page).toHaveURL(/\/test-records\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId("verdict").first()).toHaveText(/Incomplete/);
  // Each reading says where it was taken, beside its spec, on the record and on the build sheet.
  const boreRows = () => page.getByTestId("spec-row").filter({ hasText: "Bore diameter, plate fitted" }).locator("tr");
  await expect(boreRows()).toHaveCount(4);
  for (let n = 1; n <= 4; n++) await expect(boreRows().nth(n - 1)).toContainText(`cyl ${n}`);
  await page.goto(`/builds/${build}/sheet`);
  await expect(boreRows()).toHaveCount(4);
  for (let n = 1; n <= 4; n++) await expect(boreRows().nth(n - 1)).toContainText(`cyl ${n}`);
  await expect(page.locator("main")).toContainText("88.009");
});
