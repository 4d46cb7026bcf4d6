import { randomUUID } from "node:crypto";
import { and, desc, eq, gt, isNull, ne, sql } from "drizzle-orm";
import { invitations, passwordResets, sessions, users } from "~/db/schema";
import { audit } from "./audit.server";
import { endAllSessions, hashPassword, verifyPassword } from "./auth.server";
import { db, type Tx } from "./db.server";
import { DomainError } from "./domain-error";
import { env } from "./env.server";
import { composeMail, enqueueMail } from "./mail.server";
import { ROLE_LABELS, type Role } from "./permissions";
import { passwordRefusalMessage, throttledPasswordCheck, throttleResetRequest, type Refusal } from "./throttle.server";
import { INVITATION_TTL_MS, newToken, RESET_TTL_MS, hashToken, tokenState, type TokenState } from "./tokens.server";

const link = (p: string) => new URL(p, env().PUBLIC_URL).toString();

/** Everyone with an account, active or not, by name (the admin's list). */
export async function listPeople() {
  return db()
    .select({
      id: users.id,
      name: users.name,
      email: users.email,
      role: users.role,
      deactivatedAt: users.deactivatedAt,
      createdAt: users.createdAt,
    })
    .from(users)
    .orderBy(users.name);
}

/** Invitations not yet accepted (expired ones included, so the admin sees them lapse), newest first. */
export async function openInvitations(limit = 50) {
  return db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
    })
    .from(invitations)
    .where(isNull(invitations.usedAt))
    .orderBy(desc(invitations.createdAt))
    .limit(limit);
}

export async function findUserByEmail(email: string) {
  const [row] = await db().select().from(users).where(sql`lower(${users.email}) = ${email.trim().toLowerCase()}`).limit(1);
  return row ?? null;
}

/** Saves the invitation and its e-mail in one transaction; the worker sends the mail. */
export async function invite(actor: { id: string; name: string }, emailInput: string, role: Role) {
  const email = emailInput.trim().toLowerCase();
  if (await findUserByEmail(email)) throw new DomainError("Someone with this e-mail already has an account.", { field: "email" });
  const { token, hash } = newToken();
  const expiresAt = new Date(Date.now() + INVITATION_TTL_MS);
  await db().transaction(async (tx) => {
    const [inv] = await tx.insert(invitations).values({ email, role, tokenHash: hash, invitedBy: actor.id, expiresAt }).returning();
    await enqueueMail(
      tx,
      composeMail({
        to: email,
        subject: "You are invited to Benchreel",
        greeting: "Hello,",
        paragraphs: [
          `${actor.name} has invited you to Benchreel, the shop's knowledge base, as ${ROLE_LABELS[role]}.`,
          "Follow the link to choose your name and password. The link works once and expires in 7 days.",
        ],
        action: { label: "Accept the invitation", url: link(`/invite/${token}`) },
      }),
    );
    await audit(tx, actor.id, "invite", "invitation", String(inv.id), { email, role });
  });
  return { token };
}

export async function findInvitation(token: string) {
  const [row] = await db()
    .select()
    .from(invitations)
    .where(eq(invitations.tokenHash, hashToken(token)))
    .limit(1);
  return row ?? null;
}

export function invitationState(row: { expiresAt: Date; usedAt: Date | null } | null): TokenState | "unknown" {
  return row ? tokenState(row) : "unknown";
}

/** Creates the account once; a used or expired link is refused with the reason. */
export async function acceptInvitation(token: string, name: string, password: string): Promise<string> {
  const passwordHash = await hashPassword(password);
  return db().transaction(async (tx) => {
    const [inv] = await tx
      .select()
      .from(invitations)
      .where(eq(invitations.tokenHash, hashToken(token)))
      .for("update")
      .limit(1);
    const state = invitationState(inv ?? null);
    if (state === "unknown") throw new DomainError("This invitation link is not valid.");
    if (state === "used") throw new DomainError("This invitation has already been used. Sign in instead.");
    if (state === "expired") throw new DomainError("This invitation has expired. Ask the admin for a new one.");
    const [existing] = await tx.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${inv.email}`);
    if (existing) throw new DomainError("An account with this e-mail already exists. Sign in instead.");
    const id = randomUUID();
    await tx.insert(users).values({ id, email: inv.email, name: name.trim(), role: inv.role, passwordHash });
    await tx.update(invitations).set({ usedAt: new Date() }).where(eq(invitations.id, inv.id));
    await audit(tx, id, "accept-invitation", "user", id, { invitation: inv.id });
    return id;
  });
}

/**
 * Always answers the same way, so the form does not reveal who has an account. Requests are
 * counted per address and per client whether or not the account exists; past a limit no mail
 * goes out and the refusal says so (app/lib/throttle.server.ts).
 */
export async function requestPasswordReset(emailInput: string, client: string): Promise<Refusal | null> {
  const refused = await throttleResetRequest(emailInput, client);
  if (refused) return refused;
  const user = await findUserByEmail(emailInput);
  if (!user || user.deactivatedAt) return null;
  const { token, hash } = newToken();
  await db().transaction(async (tx) => {
    await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt: new Date(Date.now() + RESET_TTL_MS) });
    await enqueueMail(
      tx,
      composeMail({
        to: user.email,
        subject: "Reset your Benchreel password",
        greeting: `Hello ${user.name},`,
        paragraphs: [
          "Someone asked to reset the password of your Benchreel account. If it was not you, ignore this message.",
          "The link works once and expires in one hour.",
        ],
        action: { label: "Choose a new password", url: link(`/reset/${token}`) },
      }),
    );
    await audit(tx, user.id, "request-reset", "user", user.id);
  });
  return null;
}

export async function findReset(token: string) {
  const [row] = await db()
    .select()
    .from(passwordResets)
    .where(eq(passwordResets.tokenHash, hashToken(token)))
    .limit(1);
  return row ?? null;
}

/**
 * A new password ends what the old one opened: every other outstanding reset link of the
 * person, and their sessions (all of them, or all but `keepSessionId`), in the same
 * transaction as the password itself.
 */
async function setPassword(tx: Tx, userId: string, passwordHash: string, keepSessionId: string | null) {
  const now = new Date();
  await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
  await tx
    .update(passwordResets)
    .set({ expiresAt: now })
    .where(and(eq(passwordResets.userId, userId), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)));
  await tx
    .delete(sessions)
    .where(keepSessionId ? and(eq(sessions.userId, userId), ne(sessions.id, keepSessionId)) : eq(sessions.userId, userId));
}

/** Sets the new password once; the person's other reset links and all their sessions end. */
export async function resetPassword(token: string, password: string): Promise<string> {
  const passwordHash = await hashPassword(password);
  const userId = await db().transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(passwordResets)
      .where(eq(passwordResets.tokenHash, hashToken(token)))
      .for("update")
      .limit(1);
    if (!row) throw new DomainError("This reset link is not valid.");
    const state = tokenState(row);
    if (state === "used") throw new DomainError("This reset link has already been used. Ask for a new one.");
    if (state === "expired") throw new DomainError("This reset link has expired. Ask for a new one.");
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(eq(passwordResets.id, row.id));
    await setPassword(tx, row.userId, passwordHash, null);
    await audit(tx, row.userId, "reset-password", "user", row.userId);
    return row.userId;
  });
  return userId;
}

export type PasswordChange = { ok: true } | { ok: false; message: string; status: 400 | 429; retryAfterSec?: number };

/**
 * The account page's change: the current password is checked under the same throttles as
 * sign-in (a guess is a guess); the session making the change stays, every other one ends.
 */
export async function changePassword(
  person: { id: string; email: string },
  keepSessionId: string,
  client: string,
  current: string,
  password: string,
): Promise<PasswordChange> {
  const [row] = await db().select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, person.id));
  const outcome = await throttledPasswordCheck(
    person.email,
    client,
    async () => Boolean(row?.passwordHash) && verifyPassword(row.passwordHash!, current),
  );
  if ("refused" in outcome) {
    return { ok: false, status: 429, message: passwordRefusalMessage(outcome.refused), retryAfterSec: outcome.refused.retryAfterSec };
  }
  if (!outcome.ok) return { ok: false, status: 400, message: "That is not your current password." };
  const passwordHash = await hashPassword(password);
  await db().transaction(async (tx) => {
    await setPassword(tx, person.id, passwordHash, keepSessionId);
    await audit(tx, person.id, "change-password", "user", person.id);
  });
  return { ok: true };
}

export async function updateProfile(userId: string, name: string, unitSystem: "metric" | "inch") {
  await db().transaction(async (tx) => {
    await tx.update(users).set({ name, unitSystem }).where(eq(users.id, userId));
    await audit(tx, userId, "update-profile", "user", userId, { unitSystem });
  });
}

async function activeAdminsOtherThan(userId: string): Promise<number> {
  const [r] = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(users)
    .where(and(eq(users.role, "admin"), isNull(users.deactivatedAt), ne(users.id, userId)));
  return r?.n ?? 0;
}

export async function changeRole(actor: { id: string }, userId: string, role: Role) {
  const [target] = await db().select().from(users).where(eq(users.id, userId));
  if (!target) throw new DomainError("No such person.");
  if (target.role === "admin" && role !== "admin" && (await activeAdminsOtherThan(userId)) === 0) {
    throw new DomainError("The shop needs at least one active admin.");
  }
  await db().transaction(async (tx) => {
    await tx.update(users).set({ role }).where(eq(users.id, userId));
    await audit(tx, actor.id, "change-role", "user", userId, { from: target.role, to: role });
  });
}

/** Deactivating ends every session of the person at once. */
export async function setActive(actor: { id: string }, userId: string, active: boolean) {
  const [target] = await db().select().from(users).where(eq(users.id, userId));
  if (!target) throw new DomainError("No such person.");
  if (!active && userId === actor.id) throw new DomainError("You cannot deactivate your own account.");
  if (!active && target.role === "admin" && (await activeAdminsOtherThan(userId)) === 0) {
    throw new DomainError("The shop needs at least one active admin.");
  }
  await db().transaction(async (tx) => {
    await tx
      .update(users)
      .set({ deactivatedAt: active ? null : new Date() })
      .where(eq(users.id, userId));
    await audit(tx, actor.id, active ? "reactivate" : "deactivate", "user", userId);
  });
  if (!active) await endAllSessions(userId);
}
