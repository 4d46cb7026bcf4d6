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
