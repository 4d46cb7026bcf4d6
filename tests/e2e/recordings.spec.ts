// Recordings in the browser: upload a generated video through the page (progress to 100 %,
// state to ready), open it, drop a mark with the keyboard, seek by clicking the mark, type
// readings (with the nut-factor fit) and export CSV. Set RECORDINGS_SHOTS=<dir> to also save
// screenshots at 1280 px and 768 px.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { expect, test, type Page } from "@playwright/test";
import pg from "pg";

const shots = process.env.RECORDINGS_SHOTS;
const work = path.join(process.env.BENCHREEL_RUN_DIR ?? "/tmp", "recordings-e2e");

async function signIn(page: Page, email = "marcus@larkspur.example") {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("user-name")).toBeVisible();
}

async function shot(page: Page, name: string) {
  if (!shots) return;
  fs.mkdirSync(shots, { recursive: true });
  for (const [w, h, tag] of [
    [1280, 900, "desktop"],
    [768, 1024, "tablet"],
  ] as const) {
    await page.setViewportSize({ width: w, height: h });
    await page.waitForTimeout(300);
    await page.screenshot({ path: path.join(shots, `${name}-${tag}.png`), fullPage: true });
  }
  await page.setViewportSize({ width: 1280, height: 860 });
}

const videoTime = (page: Page) =>
  page
    .locator("video")
    .first()
    .evaluate((v: HTMLVideoElement) => v.currentTime);

test("a builder uploads a video, marks a moment with the keyboard, seeks by the mark, types readings and exports CSV", async ({ page }) => {
  test.setTimeout(120_000);
  fs.mkdirSync(work, { recursive: true });
  const clip = path.join(work, "bench-clip.mp4");
  execFileSync("/usr/bin/ffmpeg", [
    "-hide_banner",
    "-loglevel",
    "error",
    "-y",
    "-f",
    "lavfi",
    "-i",
    "testsrc2=duration=12:size=640x360:rate=25",
    "-pix_fmt",
    "yuv420p",
    "-c:v",
    "libx264",
    "-preset",
    "veryfast",
    "-movflags",
    "+faststart",
    clip,
  ]);
  const title = `Stud stretch check ${Date.now().toString(36)}`;

  await signIn(page);
  await page.goto("/recordings");
  await shot(page, "library");
  await page.getByRole("link", { name: "Upload videos" }).click();
  await expect(page.getByRole("heading", { name: "Upload videos" })).toBeVisible();
  await page.getByTestId("file-input").setInputFiles(clip);
  const item = page.getByTestId("upload-item");
  await expect(item.getByLabel("Title")).toHaveValue("bench-clip");
  await item.getByLabel("Title").fill(title);
  await item.getByLabel(/^Tags/).fill("head studs, e2e");
  await shot(page, "upload-chosen");
  await item.getByRole("button", { name: "Upload" }).click();
  await expect(item.getByTestId("upload-progress")).toHaveAttribute("aria-valuenow", "100", { timeout: 30_000 });
  await expect(item.getByTestId("upload-done")).toContainText("Uploaded");
  await expect(item.getByTestId("recording-state")).toHaveAttribute("data-state", "ready", { timeout: 60_000 });
  await shot(page, "upload-done");
  await item.getByTestId("open-recording").click();

  // Watch page: the player loads (video.js, client only).
  await expect(page.getByRole("heading", { level: 1 })).toHaveText(title);
  const video = page.locator("video").first();
  await expect(video).toBeAttached({ timeout: 15_000 });
  await expect.poll(() => video.evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 15_000 }).toBeGreaterThanOrEqual(1);
  await page.locator("body").click({ position: { x: 5, y: 5 } });

  // → jumps 5 s; M opens the mark form at that time.
  await page.keyboard.press("ArrowRight");
  await expect.poll(() => videoTime(page)).toBeCloseTo(5, 0);
  await page.keyboard.press("m");
  const text = page.getByTestId("mark-text");
  await expect(text).toBeFocused();
  await text.fill("Nut seats; start of final pass");
  await text.press("Enter");
  const mark = page.getByTestId("mark").filter({ hasText: "Nut seats" });
  await expect(mark).toBeVisible();
  await expect(mark.getByTestId("mark-time")).toHaveText("0:05.0");

  // Back to the start, then click the mark: the player seeks to it.
  await page.locator("body").click({ position: { x: 5, y: 5 } });
  await page.keyboard.press("ArrowLeft");
  await expect.poll(() => videoTime(page)).toBeLessThan(1);
  await mark.getByRole("button", { name: /Play from 0:05\.0/ }).click();
  await expect.poll(() => videoTime(page)).toBeCloseTo(5, 1);
  await expect(mark).toHaveAttribute("aria-current", "true");
  // A tick on the progress bar.
  await expect(page.locator(".br-mark-ticks .br-tick")).toHaveCount(1);

  // S … S marks a span: from here (5 s) to 5 s later.
  await page.locator("body").click({ position: { x: 5, y: 5 } });
  await page.keyboard.press("s");
  await expect(page.getByRole("status").filter({ hasText: "Span started at" })).toBeVisible();
  await page.keyboard.press("ArrowRight");
  await expect.poll(() => videoTime(page)).toBeCloseTo(10, 0);
  await page.keyboard.press("s");
  await expect(page.getByTestId("mark-text")).toBeFocused();
  await page.getByTestId("mark-text").fill("Final pass, all four studs");
  await page.getByTestId("mark-text").press("Enter");
  const span = page.getByTestId("mark").filter({ hasText: "all four studs" });
  await expect(span.getByTestId("mark-time")).toHaveText("0:05.0 – 0:10.0");
  await expect(page.locator(".br-mark-ticks .br-tick")).toHaveCount(2);

  // Readings: a torque / clamp-load pair by stud and pass; a bad line keeps what was typed.
  const grid = page.getByTestId("readings-grid");
  await grid.getByLabel("Line 1 value").fill("110");
  await grid.getByLabel("Line 1 stud no.").fill("4");
  await grid.getByLabel("Line 1 pass").fill("3");
  await grid.getByRole("button", { name: "Line 1: use current time" }).click();
  await grid.getByLabel("Line 2 quantity").selectOption("clamp-load");
  await grid.getByLabel("Line 2 stud no.").fill("4");
  await grid.getByLabel("Line 2 pass").fill("3");
  await page.getByTestId("save-readings").click();
  await expect(grid.getByRole("alert")).toContainText("Enter the value as a number.");
  await expect(grid.getByLabel("Line 1 value")).toHaveValue("110");
  await grid.getByLabel("Line 2 value").fill("51");
  await page.getByTestId("save-readings").click();
  await expect(page.getByTestId("reading-row")).toHaveCount(2);
  await expect(page.getByTestId("readings-table")).toContainText("110 N·m");
  await expect(page.getByTestId("readings-table")).toContainText("51 kN");
  await expect(page.getByTestId("nut-factor-result")).toContainText("K = 0.180");
  await expect(grid.getByLabel("Line 1 value")).toHaveValue("");
  await shot(page, "watch");

  const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("readings-csv").click()]);
  const csv = fs.readFileSync(await download.path(), "utf8");
  expect(csv.split("\n")[0]).toBe(
    "time_s,quantity,label,fastener,cylinder,journal,depth,depth_unit,angle_deg,value,unit,value_si,lube,tool,pass,note,entered_by,entered_at",
  );
  expect(csv).toContain("Torque,,4,,,,,,110,N.m,110");
  expect(csv).toContain("Clamp load,,4,,,,,,51,kN,51000");

  // ?t= opens the player at that second.
  await page.goto(`${new URL(page.url()).pathname}?t=8.5`);
  await expect.poll(() => videoTime(page), { timeout: 15_000 }).toBeCloseTo(8.5, 0);
});

test("an apprentice watches but cannot upload or mark", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  await page.goto("/recordings");
  await expect(page.getByRole("link", { name: "Upload videos" })).toHaveCount(0);
  const res = await page.goto("/recordings/upload");
  expect(res?.status()).toBe(403);
  await page.goto("/recordings");
  const card = page.getByTestId("recording-card").filter({ hasText: "Head stud clamp-load test" });
  await card.getByRole("link").first().click();
  await expect(page.getByRole("heading", { level: 1 })).toContainText("Head stud clamp-load test");
  await expect(page.getByTestId("mark").first()).toBeVisible();
  await expect(page.getByRole("button", { name: /^Mark at/ })).toHaveCount(0);
  await expect(page.getByTestId("readings-grid")).toHaveCount(0);
  await expect(page.getByTestId("nut-factor-result")).toContainText("K = ");
  await shot(page, "watch-apprentice");
});

test("an upload cut off in one browser continues in a fresh profile from where the server has it, with the title typed before; the Unfinished panel follows by itself", async ({
  page,
  browser,
}) => {
  test.setTimeout(150_000);
  fs.mkdirSync(work, { recursive: true });
  const big = path.join(work, "long-take.mp4");
  // ~20-30 MB: more than one 16 MiB chunk.
  execFileSync("/usr/bin/ffmpeg", [
    "-hide_banner",
    "-loglevel",
    "error",
    "-y",
    "-f",
    "lavfi",
    "-i",
    "testsrc2=duration=2:size=640x360:rate=25",
    "-vf",
    "noise=alls=80:allf=t",
    "-c:v",
    "libx264",
    "-preset",
    "ultrafast",
    "-qp",
    "0",
    "-pix_fmt",
    "yuv420p",
    "-movflags",
    "+faststart",
    big,
  ]);
  const size = fs.statSync(big).size;
  expect(size).toBeGreaterThan(17 * 1024 * 1024);
  const title = `Crank end-play, take ${Date.now().toString(36)}`;

  await signIn(page, "tomas@larkspur.example");
  await page.goto("/recordings/upload");
  // Let the first chunk through, then drop the connection for every later one (the client
  // retries); the page is reloaded in the middle of that.
  let patches = 0;
  await page.route("**/api/uploads/*", async (route) => {
    if (route.request().method() === "PATCH" && ++patches >= 2) return route.abort("connectionreset");
    return route.continue();
  });
  await page.getByTestId("file-input").setInputFiles(big);
  await page.getByTestId("upload-item").getByLabel("Title").fill(title);
  await page.getByTestId("upload-item").getByRole("button", { name: "Upload" }).click();
  await expect.poll(() => patches, { timeout: 30_000 }).toBeGreaterThanOrEqual(2);
  await expect(page.getByTestId("upload-item")).toContainText("retrying");
  await page.reload();
  await page.unrouteAll({ behavior: "ignoreErrors" });

  const unfinished = page.getByTestId("unfinished-uploads");
  await expect(unfinished).toContainText("long-take.mp4");
  await expect(unfinished).toContainText(/16 MB of \d+ MB on the server/);
  await shot(page, "upload-unfinished");
  // The same browser: choosing the file again offers to continue it, with the title typed before.
  await page.getByTestId("file-input").setInputFiles(big);
  await expect(page.getByTestId("upload-continues")).toContainText("16 MB");
  await expect(page.getByTestId("upload-item")).toContainText(title);
  await page.getByTestId("upload-item").getByRole("button", { name: "Remove from list" }).click();

  // A fresh browser profile (nothing in its storage): the server finds the upload by the file.
  const other = await (await browser.newContext()).newPage();
  await signIn(other, "tomas@larkspur.example");
  await other.goto("/recordings/upload");
  await expect(other.getByTestId("unfinished-uploads")).toContainText("long-take.mp4");
  const offsets: number[] = [];
  const creations: string[] = [];
  other.on("request", (r) => {
    if (!r.url().includes("/api/uploads")) return;
    if (r.method() === "PATCH") offsets.push(Number(r.headers()["upload-offset"]));
    if (r.method() === "POST") creations.push(r.url());
  });
  await other.getByTestId("file-input").setInputFiles(big);
  const item = other.getByTestId("upload-item");
  await expect(item.getByTestId("upload-continues")).toContainText("16 MB");
  await expect(item).toContainText(title);
  await item.getByRole("button", { name: "Upload" }).click();
  await expect(item.getByTestId("upload-progress")).toHaveAttribute("aria-valuenow", "100", { timeout: 30_000 });
  expect(offsets[0]).toBe(16 * 1024 * 1024);
  expect(creations).toEqual([]);
  // The panel empties without a reload.
  await expect(other.getByTestId("unfinished-uploads")).toHaveCount(0);
  await expect(item.getByTestId("recording-state")).toHaveAttribute("data-state", "ready", { timeout: 60_000 });
  await item.getByTestId("open-recording").click();
  await expect(other.getByRole("heading", { level: 1 })).toHaveText(title);
  // Nothing was left on the server for this file.
  const all = await other.evaluate(async () => (await (await fetch("/api/uploads")).json()) as { unfinished: { fileName: string }[] });
  expect(all.unfinished.filter((u) => u.fileName === "long-take.mp4")).toEqual([]);
});

// ---- issue 14: the player is ours; words for the shop -------------------------------------------

const DEMO_WATCH = "/recordings/5eed0000-0000-4000-8000-00000000c1a9";

async function openDemo(page: Page, query = "") {
  await page.goto(`${DEMO_WATCH}${query}`);
  const video = page.locator("video").first();
  // The worker processes the seeded clip after start; the page follows by itself.
  await expect(video).toBeAttached({ timeout: 60_000 });
  await expect.poll(() => video.evaluate((v: HTMLVideoElement) => v.readyState), { timeout: 30_000 }).toBeGreaterThanOrEqual(1);
  return video;
}

test("the player's controls are ours: named for a screen reader, used by keyboard, 44 px on the tablet, no stock skin", async ({
  page,
}) => {
  test.setTimeout(120_000);
  await signIn(page);
  await openDemo(page);
  const controls = page.getByRole("group", { name: "Video controls" });
  await expect(controls).toBeVisible();
  for (const name of ["Play", "Back 5 seconds", "Forward 5 seconds", "One frame back", "One frame on", "Mute"]) {
    await expect(controls.getByRole("button", { name, exact: true })).toBeEnabled();
  }
  await expect(controls.getByRole("slider", { name: "Position in the video" })).toBeEnabled();
  await expect(controls.getByRole("combobox", { name: "Playback speed" })).toBeEnabled();
  // None of video.js's own skin: no big centred play button, no stock control bar or rate button.
  await expect(page.locator(".vjs-big-play-button, .vjs-control-bar, .vjs-playback-rate")).toHaveCount(0);
  await expect(page.getByText("Playback Rate")).toHaveCount(0);
  // The marks show as ticks on our position bar.
  await expect(controls.locator(".br-mark-ticks .br-tick").first()).toBeAttached();
  expect(await controls.locator(".br-mark-ticks .br-tick").count()).toBeGreaterThanOrEqual(4);

  // Keyboard: on the position bar → moves 5 s; Space on a focused button presses that button.
  const position = controls.getByRole("slider", { name: "Position in the video" });
  await position.focus();
  await page.keyboard.press("ArrowRight");
  await expect.poll(() => videoTime(page)).toBeCloseTo(5, 0);
  await expect(position).toHaveAttribute("aria-valuetext", /^0:05\.0 of 0:2\d\.\d$/);
  await controls.getByRole("button", { name: "Mute" }).focus();
  await page.keyboard.press("Space");
  await expect(controls.getByRole("button", { name: "Mute" })).toHaveAttribute("aria-pressed", "true");
  expect(
    await page
      .locator("video")
      .first()
      .evaluate((v: HTMLVideoElement) => v.paused),
  ).toBe(true);
  await controls.getByRole("button", { name: "Play" }).focus();
  await page.keyboard.press("Space");
  await expect(controls.getByRole("button", { name: "Pause" })).toBeVisible();
  await page.keyboard.press("Space");
  await expect(controls.getByRole("button", { name: "Play" })).toBeVisible();
  await controls.getByRole("combobox", { name: "Playback speed" }).selectOption({ label: "½×" });
  expect(
    await page
      .locator("video")
      .first()
      .evaluate((v: HTMLVideoElement) => v.playbackRate),
  ).toBe(0.5);
  await expect(page.getByTestId("key-help")).toBeVisible();

  // The tablet: every control a finger can hit, at least 44 px each way.
  await page.setViewportSize({ width: 768, height: 1024 });
  const sizes = await controls.locator("button, select, input[type=range]").evaluateAll((els) =>
    els
      .filter((e) => (e as HTMLElement).offsetParent !== null)
      .map((e) => {
        const r = e.getBoundingClientRect();
        return { name: e.getAttribute("aria-label") ?? e.tagName, w: Math.round(r.width), h: Math.round(r.height) };
      }),
  );
  expect(sizes.length).toBeGreaterThanOrEqual(7);
  expect(sizes.filter((s) => s.w < 44 || s.h < 44)).toEqual([]);
  await shot(page, "player");
});

test("opening a recording at ?t=5 shows the frame at 5 s, never the poster", async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page);
  const posters: string[] = [];
  page.on("request", (r) => {
    if (r.url().includes("/poster")) posters.push(r.url());
  });
  const video = await openDemo(page, "?t=5");
  await expect.poll(() => videoTime(page), { timeout: 15_000 }).toBeCloseTo(5, 1);
  await expect(video).toBeVisible();
  await expect(page.getByText(/^Opening at/)).toHaveCount(0);
  await expect(page.locator(".vjs-poster img, .vjs-poster[style*='background-image']")).toHaveCount(0);
  await expect(page.getByTestId("player-time")).toContainText("0:05.0");
  expect(posters).toEqual([]);
  await shot(page, "watch-at-5s");

  // Without a moment the poster is what shows first (so the check above means something).
  await openDemo(page);
  expect(posters.length).toBeGreaterThan(0);
});

test("keyboard hints show where a keyboard is likely, not on a touch screen", async ({ browser }) => {
  test.setTimeout(120_000);
  const touch = await browser.newContext({ viewport: { width: 768, height: 1024 }, hasTouch: true, isMobile: true });
  const page = await touch.newPage();
  await signIn(page);
  await openDemo(page);
  await expect(page.getByRole("group", { name: "Video controls" })).toBeVisible();
  await expect(page.getByTestId("key-help")).toBeHidden();
  await touch.close();
});

test("a refused page says in the shop's words what the role cannot do, and whom to ask", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example");
  const res = await page.goto("/procedures/new");
  expect(res?.status()).toBe(403);
  await expect(page.getByTestId("forbidden-reason")).toHaveText(
    "Apprentices can read procedures, watch recordings and use the calculators, but not write procedures. Ask an editor, a senior builder or an admin.",
  );
  await expect(page.locator("main")).not.toContainText("procedure:draft");
  await expect(page.locator("main")).not.toContainText("needs");
});

test("tags keep the spelling they were given and match whatever the case", async ({ page }) => {
  await signIn(page);
  await page.goto("/procedures/head-stud-installation-and-torque-sequence");
  await expect(page.getByRole("link", { name: "2.3 L", exact: true })).toBeVisible();
  await expect(page.getByRole("link", { name: "2.3 l", exact: true })).toHaveCount(0);
  await page.goto("/procedures?tag=2.3%20l");
  await expect(page.getByTestId("procedure-card-head-stud-installation-and-torque-sequence")).toBeVisible();
  await expect(page.getByRole("navigation", { name: "Filter by tag" }).locator("[aria-current=true]")).toContainText("2.3 L");

  // A mark's tag as typed: "Torque" stays "Torque".
  const res = await page.request.post(`/api/recordings/5eed0000-0000-4000-8000-00000000c1a9/marks`, {
    data: { tStart: 3.3, text: `Tag case check ${Date.now().toString(36)}`, tags: ["Torque", "MLS"] },
    headers: { origin: new URL(page.url()).origin },
  });
  expect(res.status()).toBe(201);
  expect(((await res.json()) as { mark?: { tags: string[] }; tags?: string[] }).mark?.tags ?? []).toEqual(["Torque", "MLS"]);
});

// Words meant for developers never reach the shop's screens (issue 14 §6): no function names
// (camelCase), no capability names, no "JSON", on the screens a builder uses every day.
/** The visible text of the page's main area, and what in it reads like code. */
async function developerWords(page: Page): Promise<string[]> {
  // Each text node by itself: two elements side by side ("In review" · "Marcus") are not one word.
  const text = await page.locator("main").evaluate((main) => {
    const walker = document.createTreeWalker(main, NodeFilter.SHOW_TEXT);
    const parts: string[] = [];
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      const el = n.parentElement;
      // Shown only: not the inside of a closed disclosure (the text a calculator copies for a procedure).
      if (el && el.closest("script, style") == null && el.checkVisibility()) parts.push(n.textContent ?? "");
    }
    return parts.join("\n");
  });
  const found = new Set<string>();
  // camelCase identifiers (fitNutFactor, propertyClass, recordingId)
  for (const m of text.matchAll(/\b[a-z]+(?:[A-Z][a-z0-9]+)+\b/g)) found.add(m[0]);
  // capability names (procedure:draft, mark:edit:own)
  for (const m of text.matchAll(/\b[a-z]+:[a-z-]+(?::[a-z]+)?\b/g)) found.add(m[0]);
  if (/\bJSON\b/.test(text)) found.add("JSON");
  return [...found];
}

test("the shop's everyday screens say things in the shop's words", async ({ page }) => {
  test.setTimeout(90_000);
  await signIn(page);

  await page.goto("/calculators/preload");
  await page.getByLabel("Thread condition").selectOption("moly-paste");
  await expect(page.getByText(/^Source: Derived with the ISO 16047/)).toBeVisible();
  expect(await developerWords(page)).toEqual([]);

  for (const path of [
    "/procedures/head-stud-installation-and-torque-sequence",
    "/recordings/5eed0000-0000-4000-8000-00000000c1a9",
    "/procedures",
    "/recordings",
    "/test-records",
    "/",
  ]) {
    await page.goto(path);
    await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
    expect({ path, words: await developerWords(page) }).toEqual({ path, words: [] });
  }

  // Filing from the bench recording: its readings say their quantity in words ("no clamp load
  // spec"), not the quantity's id.
  await page.goto("/test-records/new?procedure=head-stud-installation-and-torque-sequence&recording=5eed0000-0000-4000-8000-00000000c1a9");
  await expect(page.getByText("no clamp load spec").first()).toBeVisible();
  await expect(page.getByText("no clamp-load spec")).toHaveCount(0);
  expect(await developerWords(page)).toEqual([]);

  // The apprentice's refusal page too.
  await page.context().clearCookies();
  await signIn(page, "jamie@larkspur.example");
  await page.goto("/test-records/new");
  expect(await developerWords(page)).toEqual([]);
});

test("bore readings carry cylinder, depth and angle, the lines keep what was chosen, and Bore distortion opens them", async ({ page }) => {
  await signIn(page);
  await page.goto("/recordings");
  await page.getByTestId("recording-card").filter({ hasText: "Head stud clamp-load test" }).getByRole("link").first().click();
  const grid = page.getByTestId("readings-grid");
  const cyl = String(5 + Math.floor(Math.random() * 15));
  const bore = async (line: number, depth: string, angle: string, value: string) => {
    await grid.getByLabel(`Line ${line} quantity`).selectOption("bore-diameter");
    await grid.getByLabel(`Line ${line} cylinder`).fill(cyl);
    await grid.getByLabel(`Line ${line} depth below deck`).fill(depth);
    await grid.getByLabel(`Line ${line} angle (°)`).fill(angle);
    await grid.getByLabel(`Line ${line} value`).fill(value);
  };
  // A bore line has no stud; its fields and placeholders are a bore's.
  await grid.getByLabel("Line 1 quantity").selectOption("bore-diameter");
  await expect(grid.getByLabel("Line 1 stud no.")).toHaveCount(0);
  await expect(grid.getByLabel("Line 1 label")).toHaveAttribute("placeholder", "plate on, hot");
  await bore(1, "12", "0", "88.012");
  await bore(2, "12", "90", "88.004");
  await bore(3, "45", "0", "88.010");
  await page.getByRole("button", { name: "Add a line" }).click();
  await grid.getByLabel("Line 4 cylinder").fill(cyl);
  await grid.getByLabel("Line 4 depth below deck").fill("45");
  await grid.getByLabel("Line 4 angle (°)").fill("90");
  await grid.getByLabel("Line 4 value").fill("88.006");
  await page.getByRole("button", { name: "Add a line" }).click();
  await grid.getByLabel("Line 5 quantity").selectOption("clearance");
  await expect(grid.getByLabel("Line 5 journal")).toBeVisible();
  await page.getByTestId("save-readings").click();
  const rows = page.getByTestId("reading-row").filter({ hasText: `cyl ${cyl} ·` });
  await expect(rows).toHaveCount(4);
  await expect(rows.filter({ hasText: `cyl ${cyl} · 45 mm down · 90°` })).toContainText("88.006 mm");
  // The saved lines are empty for the next readings but keep the quantity and cylinder; the line not sent is as it was.
  for (const line of [1, 2, 3, 4]) {
    await expect(grid.getByLabel(`Line ${line} quantity`)).toHaveValue("bore-diameter");
    await expect(grid.getByLabel(`Line ${line} cylinder`)).toHaveValue(cyl);
    await expect(grid.getByLabel(`Line ${line} value`)).toHaveValue("");
  }
  await expect(grid.getByLabel("Line 5 quantity")).toHaveValue("clearance");
  await shot(page, "readings-bore");

  await page.getByRole("link", { name: `Open cyl ${cyl} in Bore distortion` }).click();
  await expect(page.getByTestId("bore-source")).toContainText(`Readings of cylinder ${cyl} from Head stud clamp-load test`);
  await expect(page.locator('input[name="depths"]')).toHaveValue("12, 45");
  await expect(page.locator('input[name="angles"]')).toHaveValue("0, 90");
  await expect(page.locator('input[name="m.0.0"]')).toHaveValue("88.012");
  await expect(page.locator('input[name="m.1.1"]')).toHaveValue("88.006");
  await expect(page.getByTestId("calc-result").first()).toBeVisible();
});

test("Save as readings on the Preload calculator does not offer a recording whose video is damaged", async ({ page }) => {
  // A damaged recording, as processing leaves one (recordings-faults.test.ts makes a real one).
  const title = `Cut-short bench take ${Date.now().toString(36)}`;
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query(
      `insert into recordings (title, state, state_reason, original_name, original_size, uploaded_by) values ($1, 'damaged', 'The video is damaged: playback breaks off at 0:00.0 of 0:03.0.', 'cut-short.mp4', 6000, 'demo-marcus')`,
      [title],
    );
  } finally {
    await client.end();
  }
  await signIn(page);
  await page.goto("/calculators/preload");
  await expect(page.getByRole("button", { name: "Calculate" })).toHaveCount(0);
  await page.getByLabel("Torque and measured clamp load, one pair a line").fill(["60, 25", "90, 37.5"].join("\n"));
  await page.getByTestId("save-readings-open").click();
  const choices = page.getByTestId("save-readings").getByLabel("Recording").locator("option");
  await expect(choices.filter({ hasText: "Head stud clamp-load test" })).toHaveCount(1);
  await expect(choices.filter({ hasText: title })).toHaveCount(0);
});
