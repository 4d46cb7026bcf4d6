import { expect, test } from "@playwright/test";

const DEMO = [
  {
    email: "dana@larkspur.example",
    name: "Dana Okafor",
    role: "Admin",
    nav: ["Shop floor", "Builds", "Procedures", "Recordings", "Test records", "Calculators", "Search", "Admin"],
  },
  {
    email: "priya@larkspur.example",
    name: "Priya Raman",
    role: "Editor",
    nav: ["Shop floor", "Builds", "Procedures", "Recordings", "Test records", "Calculators", "Search"],
  },
  {
    email: "marcus@larkspur.example",
    name: "Marcus Lind",
    role: "Senior builder",
    nav: ["Shop floor", "Builds", "Procedures", "Recordings", "Test records", "Calculators", "Search"],
  },
  {
    email: "tomas@larkspur.example",
    name: "Tomás Ferreira",
    role: "QC inspector",
    nav: ["Shop floor", "Builds", "Procedures", "Recordings", "Test records", "Calculators", "Search"],
  },
  {
    email: "jamie@larkspur.example",
    name: "Jamie Cole",
    role: "Apprentice",
    nav: ["Shop floor", "Builds", "Procedures", "Recordings", "Test records", "Calculators", "Search"],
  },
];

for (const person of DEMO) {
  test(`${person.role} signs in, sees the shop floor and their navigation, and signs out`, async ({ page }) => {
    await page.goto("/");
    await expect(page).toHaveURL(/\/signin\?next=%2F/);
    await page.getByLabel("E-mail").fill(person.email);
    await page.getByLabel("Password").fill("larkspur-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByRole("heading", { level: 1 })).toContainText(`Good to see you, ${person.name.split(" ")[0]}`);
    await expect(page.getByTestId("user-role")).toHaveText(person.role);
    await expect(page.getByTestId("main-nav").getByRole("link")).toHaveText(person.nav);
    if (person.role !== "Admin") {
      const res = await page.goto("/admin/people");
      expect(res?.status()).toBe(403);
      await expect(page.getByRole("heading", { name: "Not for your role" })).toBeVisible();
      await page.goto("/");
    }
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page).toHaveURL(/\/signin$/);
    await page.goto("/");
    await expect(page).toHaveURL(/\/signin/);
  });
}

test("a wrong password shows a message and keeps the e-mail", async ({ page }) => {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill("jamie@larkspur.example");
  await page.getByLabel("Password").fill("nope");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("alert")).toContainText("do not match");
  await expect(page.getByLabel("E-mail")).toHaveValue("jamie@larkspur.example");
});

test("admin invites a person; the invitee follows the e-mailed link and is signed in", async ({ page, browser }) => {
  const email = `newhire-${Date.now()}@larkspur.example`;
  await page.goto("/signin?next=/admin/people");
  await page.getByLabel("E-mail").fill("dana@larkspur.example");
  await page.getByLabel("Password").fill("larkspur-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("heading", { name: "People" })).toBeVisible();
  const inviteForm = page.locator("form", { has: page.getByRole("button", { name: "Send invitation" }) });
  await inviteForm.getByLabel("E-mail").fill(email);
  await inviteForm.getByLabel("Role").selectOption({ label: "QC inspector" });
  await inviteForm.getByRole("button", { name: "Send invitation" }).click();
  await expect(page.getByTestId("flash")).toContainText(`Invitation sent to ${email}`);

  // The message reaches the fake SMTP server; the Outbox page lists it with its link.
  let link = "";
  await expect(async () => {
    await page.goto("/admin/outbox");
    const msg = page.getByTestId("outbox-message").filter({ hasText: email }).first();
    await expect(msg).toBeVisible({ timeout: 1000 });
    link = (await msg.getByRole("link").first().getAttribute("href")) ?? "";
    expect(link).toContain("/invite/");
  }).toPass({ timeout: 20_000 });

  // The link as stored by the fake, read from its store.
  const stored = (await (await fetch(`${process.env.SMTP_CONTROL_URL}/messages?to=${encodeURIComponent(email)}`)).json()) as {
    to: string[];
    links: string[];
  }[];
  expect(stored.find((m) => m.to.includes(email))?.links).toContain(link);

  const invitee = await browser.newContext();
  const p2 = await invitee.newPage();
  await p2.goto(link);
  await expect(p2.getByText(email)).toBeVisible();
  await p2.getByLabel("Your name").fill("Rosa Almeida");
  await p2.getByLabel("Password", { exact: true }).fill("a-good-long-password");
  await p2.getByLabel("Password again").fill("a-good-long-password");
  await p2.getByRole("button", { name: "Create my account" }).click();
  await expect(p2.getByTestId("flash")).toContainText("Welcome to Benchreel, Rosa Almeida");
  await expect(p2.getByTestId("user-role")).toHaveText("QC inspector");
  await invitee.close();

  await page.goto("/admin/people");
  await expect(page.getByTestId(`person-${email}`)).toContainText("Rosa Almeida");
});
