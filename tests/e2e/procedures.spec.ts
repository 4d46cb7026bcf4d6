// A builder writes a procedure with a link, a calculator and a spec and submits it; the editor
// compares and publishes; the apprentice reads it and the calculator computes; mail reaches the fake.
import { expect, test, type Page } from "@playwright/test";
import { demoClipOffered, editorOutline as outline, newDraft } from "../support/browser";

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
  // Three people, a whole review and full-page screenshots at two widths: more than the default minute on a busy machine.
  test.setTimeout(120_000);
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
  await ed
    .getByTestId("awaiting-review")
    .getByRole("link", { name: new RegExp(title) })
    .click();
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
  await expect(grid.getByRole("rowheader")).toHaveText(["10 mm", "50 mm", "90 mm"]);
  await expect(grid.getByRole("cell")).toHaveCount(12);
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

test("the compare view shows both revisions as the reader sees them: headings, numbered steps, N·m, calculator settings in words", async ({
  page,
}) => {
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

test("a never-published procedure offers no comparison; a returned draft waits on its author's Shop floor with the reason", async ({
  browser,
}) => {
  // Two people through two returns, with screenshots at two widths: more than the default minute on a busy machine.
  test.setTimeout(150_000);
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
  await editor
    .getByTestId("awaiting-review")
    .getByRole("link", { name: new RegExp(title) })
    .click();
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

  // Submitted again and returned again: the history keeps both returns, in order, each with its reason.
  await author.goto(`/procedures/${slug}/r/1`);
  await author.getByLabel("Change note").fill("Stretch limit given as a spec");
  await author.getByRole("button", { name: "Submit for review" }).click();
  await expect(author.getByTestId("state-badge")).toHaveText("In review");
  await editor.goto(`/procedures/${slug}/r/1`);
  await editor.getByLabel("Reason for returning").fill("Say which gauge measures the stretch");
  await editor.getByRole("button", { name: "Return to Draft" }).click();
  await expect(editor.getByTestId("return-reason")).toContainText(/Returned to Draft by Priya .+: Say which gauge measures the stretch/);
  await author.goto(`/procedures/${slug}/history`);
  const returns = author.getByTestId("history-rev-1").getByTestId("returns").getByRole("listitem");
  await expect(returns).toHaveCount(2);
  await expect(returns.nth(0)).toContainText(
    /Returned to Draft by Priya .+: Give the stretch limit as a spec \(changed and submitted again\)/,
  );
  await expect(returns.nth(1)).toContainText(/Returned to Draft by Priya .+: Say which gauge measures the stretch$/);
  await expect(author.getByTestId("history-returned")).toContainText("Say which gauge measures the stretch");
  await shoot(author, "history-returned-twice");
  await author.goto(`/procedures/${slug}/r/1`);
  await shoot(author, "revision-returned-twice");
  await author.goto(`/procedures/${slug}/print?rev=1`);
  await expect(author.getByTestId("returns").getByRole("listitem")).toHaveCount(2);
  await shoot(author, "print-returned-twice");
});

// ---- issue 14: writing a procedure ---------------------------------------------------------

const EDITOR_SHOTS = process.env.SCREENSHOTS ?? "/tmp/shots-editor";

test("an unfinished Spec block saves, marked on the block; the submit dialog lists what is missing and jumps to it", async ({ page }) => {
  test.setTimeout(120_000);
  const editor = await newDraft(page, `Half-written stud torque ${stamp}`);
  await editor.locator("p").first().click();
  await page.keyboard.type("Chase and clean every stud hole first.");
  await page.getByRole("button", { name: "Spec", exact: true }).click();
  await page.keyboard.type(" ");
  const spec = page.getByRole("group", { name: "Spec (incomplete)" });
  await expect(spec.getByTestId("block-problems")).toContainText("Give the spec a label");
  await expect(page.getByTestId("save-status")).toHaveText(/^Saved/, { timeout: 15_000 });
  await expect(page.getByTestId("incomplete-count")).toHaveText("· 1 block to finish before review");
  await expect(page.getByText(/doc\.content|attrs\./)).toHaveCount(0);
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.screenshot({ path: `${EDITOR_SHOTS}/editor-incomplete-${width}.png`, fullPage: true });
  }
  // The text and the half-done block were stored: they come back after a reload.
  await page.reload();
  await expect(page.getByTestId("editor")).toContainText("Chase and clean every stud hole first.");
  await expect(page.getByRole("group", { name: "Spec (incomplete)" })).toBeVisible();

  await page.getByLabel(/Change note/).fill("First version of the stud procedure");
  await page.getByRole("button", { name: "Submit for review" }).click();
  const dialog = page.getByTestId("submit-missing");
  await expect(dialog).toBeVisible();
  await expect(dialog).toContainText("Finish this block before review");
  await expect(dialog).toContainText("Give the spec a label · Give a nominal value or a limit");
  await page.screenshot({ path: `${EDITOR_SHOTS}/submit-missing-768.png` });
  await dialog.getByRole("button", { name: "Spec 1" }).click();
  await expect(dialog).toBeHidden();
  await expect(page.getByLabel("Spec label")).toBeFocused();
  await page.keyboard.type("Head stud final torque");
  await page.getByLabel("Spec nominal").fill("110");
  await expect(page.getByRole("group", { name: "Spec: Head stud final torque" })).toBeVisible();
  await expect(page.getByTestId("block-problems")).toHaveCount(0);
  await page.getByRole("button", { name: "Submit for review" }).click();
  await expect(page.getByTestId("state-badge")).toHaveText("In review");
});

test("a Video moment takes its time from a mark of the chosen recording, or from the preview's frame", async ({ page }) => {
  test.setTimeout(180_000); // the worker may still be processing the demo clip
  const editor = await newDraft(page, `Moment from a mark ${stamp}`);
  await demoClipOffered(page);
  await editor.locator("p").first().click();
  await page.keyboard.type("Watch the final pass.");
  await page.getByRole("button", { name: "Video moment" }).click();
  const block = page.getByRole("group", { name: /^Video moment/ });
  await expect(block.getByTestId("block-problems")).toContainText("Choose a recording");
  const recording = block.getByLabel("Recording", { exact: true });
  const value = await recording.locator("option", { hasText: "Head stud clamp-load test" }).getAttribute("value");
  await recording.selectOption(value!);
  const mark = block.getByLabel("Mark");
  await expect(mark.locator("option", { hasText: "Pass 2 to 75 N·m" })).toHaveCount(1);
  await mark.selectOption({ label: "0:13 · Pass 2 to 75 N·m" });
  await expect(block.getByLabel("Start seconds")).toHaveValue("13.2");
  await expect(block.getByLabel("Caption")).toHaveValue("Pass 2 to 75 N·m");
  await mark.selectOption({ label: "0:06–0:11 · Pass 1 to 40 N·m, centre out" });
  await expect(block.getByLabel("Start seconds")).toHaveValue("6");
  await expect(block.getByLabel("End seconds")).toHaveValue("11");
  await expect(block.getByTestId("block-problems")).toHaveCount(0);
  // The preview's current frame becomes the start.
  const preview = block.getByTestId("moment-preview").locator("video");
  await expect.poll(() => preview.evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 30_000 }).toBeGreaterThan(0);
  await preview.evaluate(
    (v: HTMLVideoElement) =>
      new Promise((done) => {
        v.addEventListener("seeked", done, { once: true });
        v.currentTime = 2.04;
      }),
  );
  await block.getByRole("button", { name: "Start at this frame" }).click();
  await expect(block.getByLabel("Start seconds")).toHaveValue("2");
  // Typing stays possible.
  await block.getByLabel("Start seconds").fill("3.5");
  await expect(page.getByTestId("save-status")).toHaveText(/^Saved/, { timeout: 15_000 });
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await block.scrollIntoViewIfNeeded();
    await page.screenshot({ path: `${EDITOR_SHOTS}/editor-moment-${width}.png`, fullPage: true });
  }
  await page.reload();
  const again = page.getByRole("group", { name: /^Video moment: Head stud clamp-load test/ });
  await expect(again.getByLabel("Start seconds")).toHaveValue("3.5");
  await expect(again.getByLabel("End seconds")).toHaveValue("11");
});

test("clicking below the last block gives a place to type, and a new block goes where the cursor is", async ({ page }) => {
  await page.setViewportSize({ width: 1366, height: 900 });
  const editor = await newDraft(page, `Cursor and blocks ${stamp}`);
  // Start from an empty page rather than the starter headings.
  await editor.locator("p").first().click();
  await page.keyboard.press("ControlOrMeta+a");
  await page.keyboard.press("Backspace");
  await page.keyboard.type("First step.");
  await page.keyboard.press("Enter");
  await page.keyboard.type("Second step.");
  await page.getByRole("button", { name: "Spec", exact: true }).click();
  expect(await outline(page)).toEqual(["p:First step.", "p:Second step.", "spec", "p:"]);
  // Below the last block, inside the editor's blank space (scrolled into view first).
  await editor.evaluate((el) => el.scrollIntoView({ block: "end" }));
  await editor.evaluate((el) => el.blur()); // the cursor must come from the click below, not from before
  const box = (await editor.boundingBox())!;
  await page.mouse.click(box.x + box.width / 2, box.y + box.height - 12);
  await page.keyboard.type("After the spec.");
  expect(await outline(page)).toEqual(["p:First step.", "p:Second step.", "spec", "p:After the spec."]);
  // Beside the text, in the card's blank space to its right (desktop width), at the height of the first step.
  const first = (await editor.getByText("First step.").boundingBox())!;
  const card = (await page.locator(".proc-editor").boundingBox())!;
  expect(card.x + card.width - (box.x + box.width)).toBeGreaterThan(40);
  await page.mouse.click(card.x + card.width - 20, first.y + first.height / 2);
  await page.keyboard.type(" Wipe dry.");
  await expect(editor.locator("p").first()).toHaveText("First step. Wipe dry.");
  // A block inserted with the cursor at the end of the first step (where the typing above left it) lands right after it.
  await page.getByRole("button", { name: "Video moment" }).click();
  expect(await outline(page)).toEqual(["p:First step. Wipe dry.", "videoMoment", "p:Second step.", "spec", "p:After the spec."]);
  // No empty paragraph is left behind: typing carries on at the start of the text below the new block.
  await page.keyboard.type("Then: ");
  expect(await outline(page)).toEqual(["p:First step. Wipe dry.", "videoMoment", "p:Then: Second step.", "spec", "p:After the spec."]);
  await expect(page.getByTestId("save-status")).toHaveText(/^Saved/, { timeout: 15_000 });
});
