// The procedure editor's blocks (issue 14 §1): a block goes where the cursor is without leaving
// an empty paragraph behind, and the Video moment block previews the recording in our own player.
import { expect, test, type Page } from "@playwright/test";
import { demoClipOffered, editorOutline as outline, newDraft } from "../support/browser";

const SHOTS = process.env.SCREENSHOTS ?? "/tmp/shots-editor";
const stamp = Date.now().toString(36);

/** An empty page to write on (the new draft's starter headings removed). */
async function blankPage(page: Page, editor: ReturnType<Page["getByTestId"]>) {
  await editor.locator("p").first().click();
  await page.keyboard.press("ControlOrMeta+a");
  await page.keyboard.press("Backspace");
}

/** The editor's card (toolbar and text) at the desktop and the tablet width, for a person to look at. */
async function shoot(page: Page, name: string) {
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.locator(".proc-editor").screenshot({ path: `${SHOTS}/${name}-${width}.png` });
  }
}

test("a block inserted mid-paragraph splits it: the text before stays above, the text after goes below, no empty paragraph", async ({
  page,
}) => {
  await page.setViewportSize({ width: 1366, height: 900 });
  const editor = await newDraft(page, `Split around a block ${stamp}`);
  await blankPage(page, editor);
  await page.keyboard.type("Torque the studs in three passes. Let the gasket settle.");
  await page.keyboard.press("Enter");
  await page.keyboard.type("Check the deck height.");
  // The cursor goes back into the first paragraph, just before "Let the gasket settle."
  await editor.getByText("Torque the studs").click();
  await page.keyboard.press("End");
  for (let i = 0; i < "Let the gasket settle.".length; i++) await page.keyboard.press("ArrowLeft");
  await page.getByRole("button", { name: "Spec", exact: true }).click();
  expect(await outline(page)).toEqual([
    "p:Torque the studs in three passes. ",
    "spec",
    "p:Let the gasket settle.",
    "p:Check the deck height.",
  ]);
  // Typing carries on where the cursor was: at the start of the text after the block.
  await page.keyboard.type("Then, ");
  expect(await outline(page)).toEqual([
    "p:Torque the studs in three passes. ",
    "spec",
    "p:Then, Let the gasket settle.",
    "p:Check the deck height.",
  ]);

  // At the end of a paragraph that other text follows, the block goes between them, with no empty paragraph.
  await editor.getByText("Then, Let the gasket settle.").click();
  await page.keyboard.press("End");
  await page.getByRole("button", { name: "Preload calculator" }).click();
  expect(await outline(page)).toEqual([
    "p:Torque the studs in three passes. ",
    "spec",
    "p:Then, Let the gasket settle.",
    "calculator",
    "p:Check the deck height.",
  ]);

  // At the end of the last paragraph, the block is last: one paragraph after it gives the place to type.
  await editor.getByText("Check the deck height.").click();
  await page.keyboard.press("End");
  await page.getByRole("button", { name: "Spec", exact: true }).click();
  expect(await outline(page)).toEqual([
    "p:Torque the studs in three passes. ",
    "spec",
    "p:Then, Let the gasket settle.",
    "calculator",
    "p:Check the deck height.",
    "spec",
    "p:",
  ]);
  await page.keyboard.type("Record the readings.");
  expect((await outline(page)).at(-1)).toBe("p:Record the readings.");

  // What was stored is what the page shows: the same blocks after a reload.
  await expect(page.getByTestId("save-status")).toHaveText(/^Saved/, { timeout: 15_000 });
  await page.reload();
  await expect(page.getByTestId("editor")).toContainText("Record the readings.");
  expect(await outline(page)).toEqual([
    "p:Torque the studs in three passes. ",
    "spec",
    "p:Then, Let the gasket settle.",
    "calculator",
    "p:Check the deck height.",
    "spec",
    "p:Record the readings.",
  ]);
  await shoot(page, "editor-split");
});

test("the Video moment block previews the recording in our player, and its frame becomes the start", async ({ page }) => {
  test.setTimeout(180_000); // the worker may still be processing the demo clip
  const editor = await newDraft(page, `Moment from the player ${stamp}`);
  await demoClipOffered(page);
  await editor.locator("p").first().click();
  await page.getByRole("button", { name: "Video moment" }).click();
  const block = page.getByRole("group", { name: /^Video moment/ });
  const recording = block.getByLabel("Recording", { exact: true });
  await recording.selectOption((await recording.locator("option", { hasText: "Head stud clamp-load test" }).getAttribute("value"))!);

  const preview = block.getByTestId("moment-preview");
  // Our controls, named; not the browser's own.
  const controls = preview.getByRole("group", { name: "Video controls" });
  await expect(controls).toBeVisible({ timeout: 30_000 });
  await expect(preview.locator("video[controls]")).toHaveCount(0);
  await expect(preview.getByLabel("Video: Head stud clamp-load test").first()).toBeAttached();
  const play = controls.getByRole("button", { name: "Play" });
  await expect(play).toBeEnabled({ timeout: 30_000 });
  for (const name of ["Back 5 seconds", "Forward 5 seconds", "One frame back", "One frame on"])
    await expect(controls.getByRole("button", { name })).toBeVisible();
  // The marks are ticks on the preview's bar.
  await expect(preview.locator("[data-mark-id]")).not.toHaveCount(0);

  // A mark fills in its time and puts the preview on it.
  await block.getByLabel("Mark").selectOption({ label: "0:13 · Pass 2 to 75 N·m" });
  await expect(block.getByLabel("Start seconds")).toHaveValue("13.2");
  await expect(preview.getByTestId("player-time")).toContainText("0:13.2");
  // From there, 5 s back in the player, and that frame becomes the start.
  await controls.getByRole("button", { name: "Back 5 seconds" }).click();
  await expect(preview.getByTestId("player-time")).toContainText("0:08.2");
  await block.getByRole("button", { name: "Start at this frame" }).click();
  await expect(block.getByLabel("Start seconds")).toHaveValue("8.2");
  // And by keyboard: a focused control presses with Enter.
  await controls.getByRole("button", { name: "Forward 5 seconds" }).focus();
  await page.keyboard.press("Enter");
  await expect(preview.getByTestId("player-time")).toContainText("0:13.2");
  await block.getByRole("button", { name: "End at this frame" }).click();
  await expect(block.getByLabel("End seconds")).toHaveValue("13.2");
  await expect(page.getByTestId("save-status")).toHaveText(/^Saved/, { timeout: 15_000 });
  await shoot(page, "editor-moment-player");
});

test("inputs copied from a calculator page, pasted into a calculator block, become the block's kind and inputs", async ({ page }) => {
  await page.setViewportSize({ width: 1366, height: 900 });
  const editor = await newDraft(page, `Pasted calculator ${stamp}`);
  await blankPage(page, editor);
  await page.getByRole("button", { name: "Preload calculator" }).click();
  await page.getByText("Paste inputs from a calculator page").click();
  // What "Copy as calculator block" on the Clearances page puts on the clipboard: { calculator, input }.
  const copied = JSON.stringify({
    calculator: "clearance",
    input: { kind: "piston-to-wall", bore: { value: 101.6, unit: "mm" }, piston: { value: 101.53, unit: "mm" } },
  });
  await page.getByLabel("Calculator inputs copied from a calculator page").fill(copied);
  await expect(page.getByLabel("Calculator kind")).toHaveValue("clearance");
  await expect(page.getByText(/Cannot compute/)).toHaveCount(0);
  await expect(page.locator("input[aria-label^='Preset']").first()).toHaveValue("101.6");
});
