// Browser-test helpers shared by the Playwright specs.
import type { Page } from "@playwright/test";

/** Signs in a demo person through the sign-in form and waits for the page asked for. */
export async function signIn(page: Page, email: string, path: string): Promise<void> {
  await page.goto(`/signin?next=${encodeURIComponent(path)}`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => u.pathname === path);
}
