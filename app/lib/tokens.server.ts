import { createHash, randomBytes, timingSafeEqual } from "node:crypto";

/** A link token: the raw value goes in the e-mail, only its SHA-256 is stored. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

export function tokenMatches(token: string, storedHash: string): boolean {
  const a = Buffer.from(hashToken(token), "hex");
  const b = Buffer.from(storedHash, "hex");
  return a.length === b.length && timingSafeEqual(a, b);
}

export type TokenState = "valid" | "used" | "expired";

/** Single-use, time-limited: used wins over expired so the message is the truthful one. */
export function tokenState(row: { expiresAt: Date; usedAt: Date | null }, now: Date = new Date()): TokenState {
  if (row.usedAt) return "used";
  if (row.expiresAt.getTime() <= now.getTime()) return "expired";
  return "valid";
}

export const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;
export const RESET_TTL_MS = 60 * 60 * 1000;
