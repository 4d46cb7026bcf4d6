// A builder writes a procedure with a link, a calculator and a spec and submits it; the editor
// compares and publishes; the apprentice reads it and the calculator computes; mail reaches the fake.
import { expect, test, type Page } from "@playwright/test";

const SHOTS = "/tmp/shots-procedures";
const stamp = Date.now().toString(36);

async function signIn(page: Page, email: string) {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: /sign in/i }).click();
  await expect(page.getByTestId("user-name")).toBeVisible();
}

test("write, submit, compare, publish, read", async ({ browser }) => {
  const title = `Ring end gap check ${stamp}`;
  const builder = await (await browser.newContext()).newPage();
  await signIn(builder, "marcus@larkspur.example");
  await builder.goto("/procedures/new");
  await builder.getByLabel("Title").fill(title);
  await builder.getByLabel("Shop area").selectOption("rotating-assembly");
  await builder.getByLabel("Tags").fill("ring gap, e2e");
  await builder.getByRole("button", { name: "Start the draft" }).click();
  await expect(builder).toHaveURL(/\/r\/1\/edit$/);
  const editor = builder.getByTestId("editor");
  await expect(editor).toBeVisible();
  await editor.locator("p").first().click();
  await builder.keyboard.type("File the top ring to the gap below before fitting. ");
  // Procedure link through the picker.
  await builder.getByRole("button", { name: "Procedure link" }).click();
  await builder.getByLabel("Search procedure titles").fill("piston-to-wall");
  await builder.getByRole("button", { name: /Checking piston-to-wall/ }).click();
  await expect(builder.getByTestId("procedure-link-chip")).toContainText("Checking piston-to-wall");
  // A spec and a calculator block.
  await builder.getByRole("button", { name: "Spec", exact: true }).click();
  await builder.getByLabel("Spec label").fill("Top ring end gap");
  await builder.getByLabel("Spec quantity").selectOption("length");
  await builder.getByLabel("Spec unit").selectOption("mm");
  await builder.getByLabel("Spec min").fill("0.45");
  await builder.getByLabel("Spec max").fill("0.55");
  await builder.getByRole("button", { name: "Preload calculator" }).click();
  await expect(builder.getByTestId("save-status")).toHaveText(/Saved/, { timeout: 15_000 });
  await builder.setViewportSize({ width: 1280, height: 1400 });
  await builder.screenshot({ path: `${SHOTS}/editor-1280.png`, fullPage: true });
  await builder.setViewportSize({ width: 768, height: 1024 });
  await builder.screenshot({ path: `${SHOTS}/editor-768.png`, fullPage: true });
  await builder.getByLabel(/Change note/).fill("First version of the ring gap check");
  await builder.getByRole("button", { name: "Submit for review" }).click();
  await expect(builder.getByTestId("state-badge")).toHaveText("In review");

  const ed = await (await browser.newContext()).newPage();
  await signIn(ed, "priya@larkspur.example");
  await ed.goto("/");
  await expect(ed.getByTestId("awaiting-review")).toContainText(title);
  await ed.getByTestId("awaiting-review").getByRole("link", { name: new RegExp(title) }).click();
  // Never published: the review opens on the revision itself (nothing to compare it with).
  await expect(ed.getByTestId("procedure-body")).toContainText("File the top ring");
  await ed.screenshot({ path: `${SHOTS}/compare-1280.png`, fullPage: true });
  await ed.getByRole("button", { name: /Publish revision 1/ }).click();
  await expect(ed.getByTestId("procedure-title")).toHaveText(title);

  const app = await (await browser.newContext()).newPage();
  await signIn(app, "jamie@larkspur.example");
  await app.goto("/procedures");
  await app.getByRole("link", { name: title }).click();
  await expect(app.getByTestId("spec-table")).toContainText("Top ring end gap");
  const calc = app.locator("[data-calc-kind='preload']");
  await expect(calc.getByTestId("calc-result")).toContainText("kN");
  await calc.getByRole("button", { name: "Try your numbers" }).click();
  await calc.getByLabel("torque").fill("80");
  await expect(calc).toContainText("Your numbers");
  await expect(calc.getByTestId("calc-result")).toContainText("80 N·m");

  // The seeded procedure with three revisions, on desktop, tablet and print.
  await app.goto("/procedures/head-stud-installation-and-torque-sequence");
  await app.setViewportSize({ width: 1280, height: 900 });
  await app.screenshot({ path: `${SHOTS}/read-1280.png`, fullPage: true });
  await app.setViewportSize({ width: 768, height: 1024 });
  await app.screenshot({ path: `${SHOTS}/read-768.png`, fullPage: true });
  await app.goto("/procedures");
  await app.screenshot({ path: `${SHOTS}/list-768.png`, fullPage: true });
  await app.goto("/procedures/head-stud-installation-and-torque-sequence/history");
  await app.screenshot({ path: `${SHOTS}/history-768.png`, fullPage: true });
  await app.goto("/procedures/head-stud-installation-and-torque-sequence/print");
  await app.emulateMedia({ media: "print" });
  await app.setViewportSize({ width: 800, height: 1100 });
  await app.screenshot({ path: `${SHOTS}/print.png`, fullPage: true });

  // The author's publish e-mail shows in the fake's outbox (admin page).
  const admin = await (await browser.newContext()).newPage();
  await signIn(admin, "dana@larkspur.example");
  await expect(async () => {
    await admin.goto("/admin/outbox");
    await expect(admin.getByText(`Published: ${title}`).first()).toBeVisible({ timeout: 2000 });
  }).toPass({ timeout: 30_000 });
});

test("a bore distortion block shows its readings as depth × angle, and a reader can change one", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  await page.goto("/procedures/torque-plate-honing-iron-lined-block");
  const calc = page.locator("[data-calc-kind='distortion']");
  const grid = calc.getByTestId("readings-grid");
  await expect(grid.getByRole("columnheader")).toHaveText(["depth", "0°", "45°", "90°", "135°"]);
  await expect(grid.getByRole("rowheader")).toHaveText(["10 mm", "50 mm"]);
  await expect(grid.getByRole("cell")).toHaveCount(8);
  const before = (await calc.getByTestId("calc-result").textContent()) ?? "";
  await calc.getByRole("button", { name: "Try your numbers" }).click();
  await calc.getByLabel("Bore diameter, mm, at 10 mm depth, 90°").fill("88.03");
  await expect(calc).toContainText("Your numbers");
  await expect(calc.getByTestId("calc-result")).not.toHaveText(before);
  for (const width of [1280, 768]) {
    await page.setViewportSize({ width, height: 1000 });
    await calc.scrollIntoViewIfNeeded();
    await calc.screenshot({ path: `${SHOTS}/distortion-block-${width}.png` });
  }
});

// ---- issue 14 §5: review and publishing that say who and what -----------------------------

const REVIEW_SHOTS = process.env.SCREENSHOTS ?? "/tmp/shots-review";

async function shoot(page: Page, name: string) {
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.screenshot({ path: `${REVIEW_SHOTS}/${name}-${width}.png`, fullPage: true });
  }
}

test("the compare view shows both revisions as the reader sees them: headings, numbered steps, N·m, calculator settings in words", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  await page.goto("/procedures/head-stud-installation-and-torque-sequence/history");
  await expect(page.getByTestId("history-rev-2").getByTestId("history-published")).toContainText(/Published .+ by Priya/);
  await shoot(page, "history");
  await page.getByRole("link", { name: "Compare with revision 1" }).click();
  const diff = page.getByTestId("text-diff");
  await expect(diff.locator("[data-block='heading']").first()).toHaveText("Why");
  await expect(diff.locator("[data-block='heading']")).toContainText(["Why", "Tools and parts", "Steps", "Checks"]);
  // The steps keep their numbers; the final pass changed from 105 to 110 N·m, marked in words.
  const finalPass = diff.locator("li[data-op='change']").filter({ hasText: "Final pass to" });
  await expect(finalPass).toContainText("Changed");
  await expect(finalPass.locator("[data-block='item']")).toContainText(/^6\.Final pass to/);
  await expect(finalPass.locator("del")).toContainText("105");
  await expect(finalPass.locator("ins")).toContainText("110");
  await expect(finalPass).toContainText("N·m");
  const calc = diff.locator("[data-block='calculator']");
  await expect(calc).toContainText("Preload calculator — M12×1.5 head studs, moly");
  await expect(calc).toContainText("torque → preload");
  await expect(calc).toContainText("property class 12.9");
  await expect(diff.locator("[data-block='spec']").first()).toContainText("Head stud final torque");
  const text = (await diff.textContent()) ?? "";
  for (const raw of ["##", "•Chase", "N.m", "propertyClass", "torque-to-preload"]) expect(text).not.toContain(raw);
  await expect(page.getByTestId("spec-diff")).toContainText("110 N·m (105–115 N·m)");
  await shoot(page, "compare");
  await page.goto("/procedures/head-stud-installation-and-torque-sequence");
  await expect(page.getByTestId("revision-author")).toHaveText(/Written by Marcus/);
  await expect(page.getByTestId("revision-published")).toHaveText(/Published .+ by Priya/);
  await shoot(page, "read-header");
});

test("a never-published procedure offers no comparison; a returned draft waits on its author's Shop floor with the reason", async ({ browser }) => {
  const title = `Rod bolt stretch ${stamp}`;
  const author = await (await browser.newContext()).newPage();
  await signIn(author, "marcus@larkspur.example");
  await author.goto("/procedures/new");
  await author.getByLabel("Title").fill(title);
  await author.getByLabel("Shop area").selectOption("fasteners");
  await author.getByRole("button", { name: "Start the draft" }).click();
  await expect(author).toHaveURL(/\/r\/1\/edit$/);
  await author.getByTestId("editor").locator("p").first().click();
  await author.keyboard.type("Measure each rod bolt's free length before torquing.");
  await expect(author.getByTestId("save-status")).toHaveText(/Saved/, { timeout: 15_000 });
  const slug = new URL(author.url()).pathname.split("/")[2];
  await author.goto(`/procedures/${slug}/r/1`);
  await expect(author.getByRole("link", { name: "History" })).toBeVisible();
  await expect(author.getByRole("link", { name: /Compare/ })).toHaveCount(0);
  await author.getByLabel("Change note").fill("First version");
  await author.getByRole("button", { name: "Submit for review" }).click();
  await expect(author.getByTestId("state-badge")).toHaveText("In review");
  await expect(author.getByRole("link", { name: /Compare/ })).toHaveCount(0);

  const editor = await (await browser.newContext()).newPage();
  await signIn(editor, "priya@larkspur.example");
  await editor.goto("/");
  await editor.getByTestId("awaiting-review").getByRole("link", { name: new RegExp(title) }).click();
  await expect(editor).toHaveURL(new RegExp(`/procedures/${slug}/r/1$`));
  await expect(editor.getByRole("link", { name: /Compare/ })).toHaveCount(0);
  await editor.getByLabel("Reason for returning").fill("Give the stretch limit as a spec");
  await editor.getByRole("button", { name: "Return to Draft" }).click();
  await expect(editor.getByTestId("return-reason")).toContainText(/Returned to Draft by Priya .+: Give the stretch limit as a spec/);

  await author.goto("/");
  const returned = author.getByTestId("returned-drafts");
  await expect(returned).toContainText(title);
  await expect(returned).toContainText(/Returned by Priya .+: Give the stretch limit as a spec/);
  await shoot(author, "shop-floor-returned");
  await returned.getByRole("link", { name: `Continue editing ${title}` }).click();
  await expect(author).toHaveURL(new RegExp(`/procedures/${slug}/r/1/edit$`));
  await author.goto(`/procedures/${slug}/history`);
  await expect(author.getByTestId("history-returned")).toContainText(/Returned to Draft by Priya .+: Give the stretch limit as a spec/);
  await shoot(author, "history-returned");
});
