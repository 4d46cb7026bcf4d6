import { sql } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { hash } from "@node-rs/argon2";
import { users } from "../../app/db/schema";

/** The invented shop's people (PRODUCT.md demo scenario). Demo password only. */
export const DEMO_PASSWORD = "larkspur-demo";
export const DEMO_USERS = [
  { id: "demo-dana", email: "dana@larkspur.example", name: "Dana Okafor", role: "admin", unitSystem: "metric" },
  { id: "demo-priya", email: "priya@larkspur.example", name: "Priya Raman", role: "editor", unitSystem: "metric" },
  { id: "demo-marcus", email: "marcus@larkspur.example", name: "Marcus Lind", role: "builder", unitSystem: "inch" },
  { id: "demo-tomas", email: "tomas@larkspur.example", name: "Tomás Ferreira", role: "qc", unitSystem: "metric" },
  { id: "demo-jamie", email: "jamie@larkspur.example", name: "Jamie Cole", role: "apprentice", unitSystem: "inch" },
] as const;

export async function seedUsers(db: NodePgDatabase<Record<string, unknown>>) {
  const existing = await db.select({ email: users.email }).from(users).where(sql`${users.id} like 'demo-%'`);
  const have = new Set(existing.map((e) => e.email));
  const missing = DEMO_USERS.filter((u) => !have.has(u.email));
  if (missing.length === 0) return 0;
  const passwordHash = await hash(DEMO_PASSWORD, { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1 });
  await db
    .insert(users)
    .values(missing.map((u) => ({ ...u, passwordHash })))
    .onConflictDoNothing();
  return missing.length;
}
