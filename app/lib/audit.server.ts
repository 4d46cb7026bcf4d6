import { auditLog } from "~/db/schema";
import type { DbOrTx } from "./db.server";

/** Records who did what to which record. Call inside the transaction of the change. */
export async function audit(
  tx: DbOrTx,
  actorId: string | null,
  action: string,
  entity: string,
  entityId: string,
  detail: Record<string, unknown> = {},
): Promise<void> {
  await tx.insert(auditLog).values({ actorId, action, entity, entityId, detail });
}
