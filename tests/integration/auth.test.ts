import { eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { invitations, mailOutbox, passwordResets, sessions, signInAttempts, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { hashToken } from "~/lib/tokens.server";
import { cookieHeader, cookiesFrom, createUser, http, mailTo, smtp, waitFor } from "../support/app";

async function signInForm(email: string, password: string, cookie?: string) {
  return http("/signin", { form: { email, password, next: "/" }, cookie });
}

function tokenFromLink(link: string, prefix: string) {
  const m = link.match(new RegExp(`${prefix}/([A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${prefix} token in ${link}`);
  return m[1];
}

describe("sign-in", () => {
  it("signs in with the right password and sets an httpOnly, SameSite=Lax session cookie", async () => {
    const u = await createUser("qc");
    const res = await signInForm(u.email, u.password);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/");
    const setCookie = res.headers.getSetCookie().find((c) => c.startsWith("br_session="))!;
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    expect(setCookie).not.toMatch(/Secure/i); // served over plain http on loopback
    const home = await http("/", { cookie: cookieHeader(setCookie) });
    expect(home.status).toBe(200);
    expect(await home.text()).toContain(u.name);
  });

  it("refuses a wrong password with a clear message and no session", async () => {
    const u = await createUser("builder");
    const res = await signInForm(u.email, "not-the-password");
    expect(res.status).toBe(401);
    expect(res.headers.getSetCookie().some((c) => c.startsWith("br_session="))).toBe(false);
    expect(await res.text()).toContain("That e-mail and password do not match an account.");
  });

  it("throttles an address after five failures and says when to try again", async () => {
    const u = await createUser("apprentice");
    for (let i = 0; i < 5; i++) expect((await signInForm(u.email, `wrong-${i}`)).status).toBe(401);
    const blocked = await signInForm(u.email, u.password); // even the right password waits
    expect(blocked.status).toBe(429);
    expect(await blocked.text()).toMatch(/Try again in 15 minutes/);
    // Once the failures are older than the window, the address may try again.
    await db().update(signInAttempts).set({ at: sql`now() - interval '16 minutes'` }).where(eq(signInAttempts.email, u.email));
    expect((await signInForm(u.email, u.password)).status).toBe(302);
  });

  it("rotates the session id at sign-in and ends the old one", async () => {
    const u = await createUser("editor");
    const before = u.cookie;
    const res = await signInForm(u.email, u.password, before);
    const after = cookiesFrom(res);
    expect(after).toMatch(/^br_session=/);
    expect(after).not.toBe(before);
    expect((await http("/", { cookie: before })).status).toBe(302);
    expect((await http("/", { cookie: after })).status).toBe(200);
  });

  it("signs out with a POST and the session stops working", async () => {
    const u = await createUser("qc");
    const res = await http("/signout", { method: "POST", form: {}, cookie: u.cookie });
    expect(res.status).toBe(302);
    expect((await http("/api/me", { cookie: u.cookie })).status).toBe(401);
  });

  it("answers 401 JSON on the API and a sign-in redirect with the return path on pages", async () => {
    const api = await http("/api/me");
    expect(api.status).toBe(401);
    expect(await api.json()).toEqual({ error: "sign-in required", reason: "You are signed out (the session ended or was closed). Sign in again." });
    const page = await http("/admin/people?x=1");
    expect(page.status).toBe(302);
    expect(page.headers.get("location")).toBe("/signin?next=%2Fadmin%2Fpeople%3Fx%3D1");
  });
});

describe("CSRF and headers", () => {
  it("refuses a state-changing request from another origin or without one", async () => {
    const admin = await createUser("admin");
    const evil = await http("/admin/people", { form: { intent: "invite", email: "x@evil.example", role: "admin" }, cookie: admin.cookie, origin: "http://evil.example" });
    // React Router's own origin check answers 400 for page actions before our middleware's 403.
    expect([400, 403]).toContain(evil.status);
    const none = await http("/admin/people", { form: { intent: "invite", email: "y@evil.example", role: "admin" }, cookie: admin.cookie, origin: null });
    expect(none.status).toBe(403);
    const rows = await db().select().from(invitations).where(sql`${invitations.email} in ('x@evil.example','y@evil.example')`);
    expect(rows).toHaveLength(0);
  });

  it("sends the security headers on pages, API and health", async () => {
    for (const p of ["/signin", "/api/me", "/healthz"]) {
      const res = await http(p);
      expect(res.headers.get("x-content-type-options")).toBe("nosniff");
      expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("x-frame-options")).toBe("DENY");
      expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    }
  });

  it("reports database and mail status on /healthz", async () => {
    const res = await http("/healthz");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.status).toBe("ok");
    expect(body.database.ok).toBe(true);
    expect(typeof body.mail.pending).toBe("number");
  });
});

describe("people administration", () => {
  it("deactivating someone ends their sessions at once and blocks sign-in", async () => {
    const admin = await createUser("admin");
    const victim = await createUser("builder");
    expect((await http("/api/me", { cookie: victim.cookie })).status).toBe(200);
    const res = await http("/admin/people", { form: { intent: "deactivate", userId: victim.id }, cookie: admin.cookie });
    expect(res.status).toBe(302);
    expect((await http("/api/me", { cookie: victim.cookie })).status).toBe(401);
    const left = await db().select().from(sessions).where(eq(sessions.userId, victim.id));
    expect(left).toHaveLength(0);
    const again = await signInForm(victim.email, victim.password);
    expect(again.status).toBe(403);
    expect(await again.text()).toContain("deactivated");
  });

  it("changes a role, and refuses non-admins", async () => {
    const admin = await createUser("admin");
    const target = await createUser("apprentice");
    const editor = await createUser("editor");
    expect((await http("/admin/people", { form: { intent: "role", userId: target.id, role: "qc" }, cookie: editor.cookie })).status).toBe(403);
    expect((await http("/admin/people", { form: { intent: "role", userId: target.id, role: "qc" }, cookie: admin.cookie })).status).toBe(302);
    const [row] = await db().select().from(users).where(eq(users.id, target.id));
    expect(row.role).toBe("qc");
    const me = await (await http("/api/me", { cookie: target.cookie })).json();
    expect(me.user.role).toBe("qc");
  });

  it("shows field errors for a bad invitation and keeps what was typed", async () => {
    const admin = await createUser("admin");
    const res = await http("/admin/people", { form: { intent: "invite", email: "not-an-address", role: "qc" }, cookie: admin.cookie });
    expect(res.status).toBe(400);
    const html = await res.text();
    expect(html).toContain("Enter an e-mail address.");
    expect(html).toContain('value="not-an-address"');
  });
});

describe("invitations", () => {
  it("an invitation e-mail goes through SMTP; the link works once, then is refused", async () => {
    const admin = await createUser("admin");
    const email = `new-${Date.now()}@larkspur.example`;
    const res = await http("/admin/people", { form: { intent: "invite", email, role: "qc" }, cookie: admin.cookie });
    expect(res.status).toBe(302);
    const mail = await mailTo(email, "invited");
    expect(mail.html).toContain("<a href=");
    const link = mail.links.find((l) => l.includes("/invite/"))!;
    const token = tokenFromLink(link, "/invite");
    const [inv] = await db().select().from(invitations).where(eq(invitations.email, email));
    expect(inv.tokenHash).toBe(hashToken(token)); // only the hash is stored

    const page = await http(`/invite/${token}`);
    expect(await page.text()).toContain(email);
    const bad = await http(`/invite/${token}`, { form: { name: "Ana", password: "short", confirm: "short" } });
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain("Use at least 10 characters.");

    const ok = await http(`/invite/${token}`, { form: { name: "Ana Reyes", password: "a-long-password", confirm: "a-long-password" } });
    expect(ok.status).toBe(302);
    const cookie = cookiesFrom(ok);
    const me = await (await http("/api/me", { cookie })).json();
    expect(me.user).toMatchObject({ email, name: "Ana Reyes", role: "qc" });

    const twice = await http(`/invite/${token}`, { form: { name: "Ana Reyes", password: "a-long-password", confirm: "a-long-password" } });
    expect(twice.status).toBe(409);
    expect(await twice.text()).toContain("already been used");
  });

  it("refuses an expired invitation", async () => {
    const admin = await createUser("admin");
    const email = `late-${Date.now()}@larkspur.example`;
    await http("/admin/people", { form: { intent: "invite", email, role: "apprentice" }, cookie: admin.cookie });
    const mail = await mailTo(email, "invited");
    const token = tokenFromLink(mail.links.find((l) => l.includes("/invite/"))!, "/invite");
    await db().update(invitations).set({ expiresAt: sql`now() - interval '1 minute'` }).where(eq(invitations.email, email));
    expect(await (await http(`/invite/${token}`)).text()).toContain("This invitation has expired.");
    const res = await http(`/invite/${token}`, { form: { name: "Late Person", password: "a-long-password", confirm: "a-long-password" } });
    expect(res.status).toBe(409);
    expect((await db().select().from(users).where(eq(users.email, email))).length).toBe(0);
  });
});

describe("password reset", () => {
  it("mails a single-use link that sets the password and ends old sessions", async () => {
    const u = await createUser("builder");
    const res = await http("/reset", { form: { email: u.email } });
    expect(res.status).toBe(200);
    const mail = await mailTo(u.email, "Reset");
    const token = tokenFromLink(mail.links.find((l) => l.includes("/reset/"))!, "/reset");
    const done = await http(`/reset/${token}`, { form: { password: "brand-new-password", confirm: "brand-new-password" } });
    expect(done.status).toBe(302);
    expect((await http("/api/me", { cookie: u.cookie })).status).toBe(401);
    expect((await signInForm(u.email, u.password)).status).toBe(401);
    expect((await signInForm(u.email, "brand-new-password")).status).toBe(302);
    const again = await http(`/reset/${token}`, { form: { password: "another-password", confirm: "another-password" } });
    expect(again.status).toBe(409);
    expect(await again.text()).toContain("already been used");
  });

  it("answers the same for an unknown address and sends nothing", async () => {
    const before = (await db().select().from(mailOutbox)).length;
    const res = await http("/reset", { form: { email: "nobody@larkspur.example" } });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("a link to choose a new password is on its way");
    expect((await db().select().from(mailOutbox)).length).toBe(before);
  });

  it("refuses an expired reset link", async () => {
    const u = await createUser("qc");
    await http("/reset", { form: { email: u.email } });
    const mail = await mailTo(u.email, "Reset");
    const token = tokenFromLink(mail.links.find((l) => l.includes("/reset/"))!, "/reset");
    await db().update(passwordResets).set({ expiresAt: sql`now() - interval '1 second'` }).where(eq(passwordResets.tokenHash, hashToken(token)));
    const res = await http(`/reset/${token}`, { form: { password: "brand-new-password", confirm: "brand-new-password" } });
    expect(res.status).toBe(409);
    expect(await res.text()).toContain("expired");
  });
});

describe("mail outbox", () => {
  it("keeps the invitation when SMTP is down, retries, and delivers when it is back", async () => {
    const admin = await createUser("admin");
    const email = `outage-${Date.now()}@larkspur.example`;
    await smtp("stop");
    try {
      const res = await http("/admin/people", { form: { intent: "invite", email, role: "builder" }, cookie: admin.cookie });
      expect(res.status).toBe(302);
      expect((await db().select().from(invitations).where(eq(invitations.email, email))).length).toBe(1);
      const failing = await waitFor(async () => {
        const [row] = await db().select().from(mailOutbox).where(eq(mailOutbox.to, email));
        return row && row.attempts >= 1 && row.lastError ? row : null;
      });
      expect(failing.sentAt).toBeNull();
      expect(failing.lastError).toMatch(/ECONNREFUSED|connect/i);
    } finally {
      await smtp("start");
    }
    await mailTo(email, "invited", 30_000);
    const [sent] = await db().select().from(mailOutbox).where(eq(mailOutbox.to, email));
    expect(sent.sentAt).not.toBeNull();
    expect(sent.attempts).toBeGreaterThanOrEqual(2);
  });
});
