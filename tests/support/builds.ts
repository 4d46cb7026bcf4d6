import { and, eq } from "drizzle-orm";
import { beforeAll } from "vitest";
import { builds, procedureSpecs, procedures } from "~/db/schema";
import { db } from "~/lib/db.server";

/**
 * Work order numbers for a test file's records: since issue 16 a test record is filed for a
 * build, so each number handed out names a build made before the file's tests run. `prefix` is
 * two to five capital letters, one per file, so files do not share numbers by chance.
 */
export function workOrderPool(prefix: string, size = 80): () => string {
  const year = String(10 + Math.floor(Math.random() * 89));
  const start = 10_000 + Math.floor(Math.random() * 80_000);
  const numbers = Array.from({ length: size }, (_, i) => `${prefix}-${year}-${start + i}`);
  let next = 0;
  beforeAll(async () => {
    await db()
      .insert(builds)
      .values(numbers.map((number) => ({ number, customerName: "Test customer" })))
      .onConflictDoNothing();
  });
  return () => numbers[next++ % size];
}

/** The demo's published honing procedure and its bore diameter spec, to file bore readings against. */
export async function demoBoreSpec() {
  const [p] = await db().select().from(procedures).where(eq(procedures.slug, "torque-plate-honing-iron-lined-block"));
  const [spec] = await db()
    .select()
    .from(procedureSpecs)
    .where(and(eq(procedureSpecs.revisionId, p.publishedRevisionId!), eq(procedureSpecs.specKey, "bore-dia")));
  return { slug: p.slug, revisionId: p.publishedRevisionId!, spec };
}
