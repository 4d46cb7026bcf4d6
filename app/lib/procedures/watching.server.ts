/** Who watches a procedure (mailed when a new revision is published; the read page asks whether the reader does). */
import { and, eq } from "drizzle-orm";
import { procedureWatchers } from "~/db/schema";
import { db } from "~/lib/db.server";

export async function setWatching(userId: string, procedureId: string, on: boolean) {
  if (on) await db().insert(procedureWatchers).values({ procedureId, userId }).onConflictDoNothing();
  else
    await db()
      .delete(procedureWatchers)
      .where(and(eq(procedureWatchers.procedureId, procedureId), eq(procedureWatchers.userId, userId)));
}
