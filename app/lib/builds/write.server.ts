import { and, asc, eq, isNull } from "drizzle-orm";
import { buildEvents, builds, users } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { toSI } from "~/lib/calc/units";
import { type DbOrTx, db } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import { type Role, can } from "~/lib/permissions";
import { getBuildByNumber } from "./builds.server";
import type { BuildFields, TypedSize } from "./form";
import { BUILD_STATUS_LABELS, type BuildStatus, canMoveTo, canReopen } from "./status";

// Creating and changing builds. Every change writes a timeline event and an audit entry in
// the same transaction.

type Actor = { id: string; role: Role };

/** People who can lead a build: active, and allowed to change builds. */
export async function leadBuilderOptions(): Promise<{ id: string; name: string }[]> {
  const rows = await db()
    .select({ id: users.id, name: users.name, role: users.role })
    .from(users)
    .where(isNull(users.deactivatedAt))
    .orderBy(asc(users.name));
  return rows.filter((u) => can(u.role, "builds:write")).map(({ id, name }) => ({ id, name }));
}

async function checkLead(h: DbOrTx, id: string): Promise<string | null> {
  if (!id) return null;
  const [u] = await h
    .select({ id: users.id, role: users.role })
    .from(users)
    .where(and(eq(users.id, id), isNull(users.deactivatedAt)));
  if (!u || !can(u.role, "builds:write"))
    throw new DomainError("Choose a lead builder from the list.", { status: 422, field: "leadBuilderId" });
  return u.id;
}

function sizeColumns(prefix: "bore" | "stroke", s: TypedSize) {
  return {
    [`${prefix}M`]: s ? toSI(s.value, s.unit) : null,
    [`${prefix}Unit`]: s?.unit ?? null,
    [`${prefix}Decimals`]: s?.decimals ?? null,
  } as Record<`${typeof prefix}${"M" | "Unit" | "Decimals"}`, never>;
}

function columns(f: BuildFields) {
  return {
    customerName: f.customerName,
    customerContact: f.customerContact,
    engine: f.engine,
    engineSerial: f.engineSerial,
    notes: f.notes,
    receivedOn: f.receivedOn,
    promisedOn: f.promisedOn,
    ...sizeColumns("bore", f.bore),
    ...sizeColumns("stroke", f.stroke),
    cylinders: f.cylinders,
    mainJournals: f.mainJournals,
  };
}

export async function addBuildEvent(
  h: DbOrTx,
  buildId: string,
  actorId: string | null,
  kind: string,
  detail: Record<string, string | number | boolean | null> = {},
) {
  await h.insert(buildEvents).values({ buildId, actorId, kind, detail });
}

export async function createBuild(actor: Actor, f: BuildFields & { number: string }) {
  return db().transaction(async (tx) => {
    if (await getBuildByNumber(f.number, tx))
      throw new DomainError(`There is already a build ${f.number}.`, { status: 409, field: "number" });
    const leadBuilderId = await checkLead(tx, f.leadBuilderId);
    const [b] = await tx
      .insert(builds)
      .values({ number: f.number, ...columns(f), leadBuilderId, createdBy: actor.id })
      .onConflictDoNothing()
      .returning();
    if (!b) throw new DomainError(`There is already a build ${f.number}.`, { status: 409, field: "number" });
    await addBuildEvent(tx, b.id, actor.id, "created", { customer: f.customerName });
    await audit(tx, actor.id, "create", "build", b.id, { number: b.number });
    return b;
  });
}

/** Which of the fields a person sees changed, in words, for the timeline. */
const FIELD_WORDS: Record<string, string> = {
  customerName: "customer",
  customerContact: "contact",
  engine: "engine",
  engineSerial: "serial",
  notes: "notes",
  receivedOn: "received",
  promisedOn: "promised",
  boreM: "bore",
  strokeM: "stroke",
  cylinders: "cylinders",
  mainJournals: "main journals",
  leadBuilderId: "lead builder",
};

export async function updateBuild(actor: Actor, buildId: string, f: BuildFields) {
  return db().transaction(async (tx) => {
    const [before] = await tx.select().from(builds).where(eq(builds.id, buildId)).for("update");
    if (!before) throw new DomainError("That build does not exist.", { status: 404 });
    const leadBuilderId = await checkLead(tx, f.leadBuilderId);
    const next = { ...columns(f), leadBuilderId };
    const changed = Object.keys(FIELD_WORDS).filter((k) => (before as Record<string, unknown>)[k] !== (next as Record<string, unknown>)[k]);
    await tx
      .update(builds)
      .set({ ...next, updatedAt: new Date() })
      .where(eq(builds.id, buildId));
    if (changed.length) {
      await addBuildEvent(tx, buildId, actor.id, "edited", { fields: changed.map((k) => FIELD_WORDS[k]).join(", ") });
      await audit(tx, actor.id, "edit", "build", buildId, { fields: changed });
    }
    return changed.length;
  });
}

/** Moves a build forward (Open → On the bench → Finished → Delivered). */
export async function moveBuild(actor: Actor, buildId: string, to: BuildStatus) {
  return db().transaction(async (tx) => {
    const [b] = await tx.select().from(builds).where(eq(builds.id, buildId)).for("update");
    if (!b) throw new DomainError("That build does not exist.", { status: 404 });
    if (!canMoveTo(b.status, to))
      throw new DomainError(
        `The build is ${BUILD_STATUS_LABELS[b.status]}; it cannot go to ${BUILD_STATUS_LABELS[to]}. To go back, reopen it with a reason.`,
        { status: 409 },
      );
    const now = new Date();
    await tx
      .update(builds)
      .set({
        status: to,
        updatedAt: now,
        ...(to === "finished" || (to === "delivered" && !b.finishedAt) ? { finishedAt: now } : {}),
        ...(to === "delivered" ? { deliveredAt: now } : {}),
      })
      .where(eq(builds.id, buildId));
    await addBuildEvent(tx, buildId, actor.id, "status", { from: b.status, to });
    await audit(tx, actor.id, "status", "build", buildId, { from: b.status, to });
  });
}

/** A Finished or Delivered build goes back On the bench, with the reason kept. */
export async function reopenBuild(actor: Actor, buildId: string, reason: string) {
  return db().transaction(async (tx) => {
    const [b] = await tx.select().from(builds).where(eq(builds.id, buildId)).for("update");
    if (!b) throw new DomainError("That build does not exist.", { status: 404 });
    if (!canReopen(b.status))
      throw new DomainError(`Only a Finished or Delivered build is reopened; this one is ${BUILD_STATUS_LABELS[b.status]}.`, {
        status: 409,
      });
    await tx
      .update(builds)
      .set({ status: "on_bench", reopenReason: reason, finishedAt: null, deliveredAt: null, updatedAt: new Date() })
      .where(eq(builds.id, buildId));
    await addBuildEvent(tx, buildId, actor.id, "reopened", { from: b.status, reason });
    await audit(tx, actor.id, "reopen", "build", buildId, { from: b.status, reason });
  });
}
