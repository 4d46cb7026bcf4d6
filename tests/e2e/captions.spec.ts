// Issue 17 in the browser: a caption file given with the upload, the transcript beside the
// player following playback, a line played from its second, a misheard word corrected in place,
// and the corrected word found through the header search, landing at the line's second.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { expect, type Page, test } from "@playwright/test";
import { signIn } from "../support/browser";

const work = path.join(process.env.BENCHREEL_RUN_DIR ?? "/tmp", "captions-e2e");

const videoTime = (page: Page) => page.evaluate(() => document.querySelector("video")?.currentTime ?? -1);

test("captions given at upload: the transcript follows playback, a line plays from its second, a corrected word is found by search at that second", async ({
  page,
}) => {
  test.setTimeout(180_000);
  fs.mkdirSync(work, { recursive: true });
  const token = `lugwrk${Date.now().toString(36)}`;
  const clip = path.join(work, "talk-clip.mp4");
  execFileSync("/usr/bin/ffmpeg", [
    ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", "testsrc2=duration=12:size=640x360:rate=25"],
    ...["-pix_fmt", "yuv420p", "-c:v", "libx264", "-preset", "veryfast", "-movflags", "+faststart", clip],
  ]);
  // SRT's common form, as a phone's transcription writes it (with the misheard "Molly").
  const srt = path.join(work, "talk-clip.srt");
  fs.writeFileSync(
    srt,
    [
      "1\n00:00:00,500 --> 00:00:03,500\nStuds chased and blown out.\n",
      `2\n00:00:04,000 --> 00:00:07,000\nMolly on the threads for the ${token} job.\n`,
      "3\n00:00:08,000 --> 00:00:11,000\nFirst pass, centre out.\n",
    ].join("\n"),
  );

  await signIn(page, "marcus@larkspur.example");
  await page.goto("/recordings/upload");
  await page.getByTestId("file-input").setInputFiles(clip);
  const item = page.getByTestId("upload-item");
  await item.getByLabel("Title").fill(`Stud prep talk ${token}`);
  await item.getByTestId("upload-captions").setInputFiles(srt);
  await item.getByRole("button", { name: "Upload" }).click();
  await expect(item.getByTestId("upload-done")).toContainText("Captions attached (3 lines)", { timeout: 60_000 });
  await expect(item.getByTestId("recording-state")).toHaveAttribute("data-state", "ready", { timeout: 60_000 });
  await item.getByTestId("open-recording").click();

  const transcript = page.getByTestId("transcript");
  await expect(transcript.getByTestId("transcript-line")).toHaveCount(3);
  const video = page.locator("video").first();
  await expect.poll(() => video.evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 15_000 }).toBeGreaterThanOrEqual(1);

  // A click on a line plays from its second; that line is the current one.
  const third = transcript.getByRole("button", { name: /^Play the line at 0:08\.0/ });
  await third.click();
  await expect.poll(() => videoTime(page)).toBeCloseTo(8, 0);
  await expect(transcript.locator("li[aria-current='true']")).toContainText("First pass, centre out.");
  // Playing on, the picture shows the line over it, and the transcript follows.
  await transcript.getByRole("button", { name: /^Play the line at 0:00\.5/ }).click();
  await expect.poll(() => videoTime(page)).toBeLessThan(1);
  await page.getByTestId("player-play").click();
  await expect(page.getByTestId("player-captions")).toHaveText("Studs chased and blown out.", { timeout: 10_000 });
  await expect(transcript.locator("li[aria-current='true']")).toContainText(`for the ${token} job`, { timeout: 10_000 });
  await page.getByTestId("player-play").click(); // pause
  // Captions off: nothing over the picture.
  await page.getByTestId("player-captions-toggle").click();
  await expect(page.getByTestId("player-captions-toggle")).toHaveAttribute("aria-pressed", "false");
  await expect(page.getByTestId("player-captions")).toHaveCount(0);

  // Correct the misheard word in place; the correction is kept with who made it.
  await transcript.getByRole("button", { name: "Correct the line at 0:04.0" }).click();
  const words = transcript.getByLabel(/Words at 0:04\.0/);
  await expect(words).toBeFocused();
  await words.fill(`Moly on the threads for the ${token} job.`);
  await transcript.getByRole("button", { name: "Save correction" }).click();
  const second = transcript.locator("li[data-cue-id]").filter({ hasText: `Moly on the threads for the ${token} job.` });
  await expect(second).toContainText("Corrected by Marcus Lind");

  // The header search finds the corrected word, and its hit opens the player at the line's second.
  await page.goto("/recordings");
  await expect(async () => {
    await page.keyboard.press("/");
    await expect(page.locator("#header-search")).toBeFocused({ timeout: 500 });
  }).toPass({ timeout: 10_000 });
  await page.keyboard.type(`${token} moly`);
  const dropdown = page.getByTestId("search-dropdown");
  const hit = dropdown.getByTestId("search-hit").filter({ hasText: "Moly on the threads" });
  await expect(async () => {
    await page.locator("#header-search").fill(`${token} moly`);
    await expect(hit).toBeVisible({ timeout: 2_000 });
  }).toPass({ timeout: 30_000 });
  await expect(dropdown.getByRole("heading", { name: "Said in recordings" })).toBeVisible();
  await expect(hit).toContainText("at 0:04");
  await expect(hit).toContainText("Studs chased and blown out.");
  await hit.click();
  await expect(page).toHaveURL(/\/recordings\/[0-9a-f-]+\?t=4$/);
  await expect.poll(() => videoTime(page), { timeout: 20_000 }).toBeCloseTo(4, 0);
});
