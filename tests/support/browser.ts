// Helpers for the Playwright specs (tests/e2e), which run in Node beside the browser.
import { expect, type Page } from "@playwright/test";

/** The demo people (scripts/seed/users.ts), one per role; all share the demo password. */
export const DEMO_PEOPLE = {
  admin: "dana@larkspur.example",
  editor: "priya@larkspur.example",
  builder: "marcus@larkspur.example",
  qc: "tomas@larkspur.example",
  apprentice: "jamie@larkspur.example",
} as const;
export const DEMO_PASSWORD = "larkspur-demo";
export const DEMO_PROCEDURE = "head-stud-installation-and-torque-sequence";
export const DEMO_RECORDING = "5eed0000-0000-4000-8000-00000000c1a9";

/** Signs in through the sign-in form and waits for the header to show the person. */
export async function signIn(page: Page, email: string) {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("user-name")).toBeVisible();
}

/** Starts a new draft procedure as the demo builder and returns the editor's text area. */
export async function newDraft(page: Page, title: string) {
  await signIn(page, DEMO_PEOPLE.builder);
  await page.goto("/procedures/new");
  await page.getByLabel("Title").fill(title);
  await page.getByLabel("Shop area").selectOption("fasteners");
  await page.getByRole("button", { name: "Start the draft" }).click();
  await expect(page).toHaveURL(/\/r\/1\/edit$/);
  const editor = page.getByTestId("editor");
  await expect(editor).toBeVisible();
  return editor;
}

/** The editor's top-level blocks, in order: "p:text" for paragraphs, the block's type for custom blocks. */
export async function editorOutline(page: Page) {
  return page.getByTestId("editor").evaluate((el) =>
    [...el.children].map((c) => {
      const block = c.getAttribute("data-block") ?? c.querySelector("[data-block]")?.getAttribute("data-block");
      return block ?? `${c.tagName.toLowerCase()}:${c.textContent ?? ""}`;
    }),
  );
}

/** The demo clip is processed by the worker after seeding: waits until the editor offers it. */
export async function demoClipOffered(page: Page) {
  await expect(async () => {
    const j = await (await page.request.get("/api/procedures/recordings")).json();
    expect(j.results.map((r: { title: string }) => r.title).join("|")).toContain("Head stud clamp-load test");
  }).toPass({ timeout: 90_000 });
}
