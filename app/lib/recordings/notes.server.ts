import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { builds, marks, readings } from "~/db/schema";
import { assertCan, forbidden, type SessionUser } from "../auth.server";
import { db } from "../db.server";
import { canOnOwned } from "../permissions";
import { readableProcedureIds, UNREADABLE_PROCEDURE, type Reader } from "../procedures/visibility.server";
import { DomainError } from "../domain-error";
import { domainErrorJson } from "../domain-error.server";
import { invalidInput, notFound } from "../edge.server";
import { getRecording, listMarks, listReadings, procedureChoices } from "./library.server";
import { markInputSchema, markPatchSchema } from "./marks";
import { positionInputOf } from "./positions";
import { readingInputSchema, toStoredSI } from "./quantities";
import { assertTakesReadings } from "./reading-targets";
import { moveMark, newMarkBuildId, resolveBuild } from "./build-link.server";

/**
 * Marks and readings: the rules the JSON API applies (validation against the recording's
 * duration, units that fit the quantity, ownership for edit and delete).
 */

export async function recordingOr404(request: Request, id: string) {
  const rec = await getRecording(id);
  if (!rec) notFound(request, "recording");
  return rec;
}

/**
 * A mark may point only at a procedure its writer may read (visibility.server.ts). A missing
 * procedure and someone else's unpublished draft get the same answer, so the API tells no one
 * which drafts exist.
 */
async function procedureUnreadable(reader: Reader, id: string | null | undefined): Promise<boolean> {
  if (!id) return false;
  return !(await readableProcedureIds(reader, [id])).has(id);
}

/** A value the rules refuse, as the API's 422 with the field it belongs to. */
const refused = (path: string, message: string) =>
  domainErrorJson(new DomainError(message, { status: 422, field: path, issues: [{ path, message }] }));

const unknownProcedure = () => refused("procedureId", "That procedure does not exist, or it is not published yet.");

/**
 * A recording's marks as `reader` may see them: a link to a procedure the reader may not read
 * keeps its id (so the mark's author can still edit the mark) but loses its title and address.
 */
export async function marksFor(reader: Reader, recordingId: string) {
  const rows = await listMarks(recordingId);
  const readable = await readableProcedureIds(
    reader,
    rows.flatMap((m) => (m.procedureId ? [m.procedureId] : [])),
  );
  return rows.map((m) =>
    m.procedureId && !readable.has(m.procedureId) ? { ...m, procedureTitle: UNREADABLE_PROCEDURE, procedureSlug: null } : m,
  );
}

/** The procedures a mark's link may be set to by `reader` (the watch page's choices). */
export async function procedureChoicesFor(reader: Reader) {
  const all = await procedureChoices();
  const readable = await readableProcedureIds(
    reader,
    all.map((p) => p.id),
  );
  return all.filter((p) => readable.has(p.id));
}

// ---- marks -----------------------------------------------------------------------------------

export async function createMark(request: Request, user: SessionUser, recordingId: string, body: unknown) {
  assertCan(request, user, "mark:create");
  const rec = await recordingOr404(request, recordingId);
  const parsed = markInputSchema(rec.durationS).safeParse(body);
  if (!parsed.success) return invalidInput(request, parsed.error);
  if (await procedureUnreadable(user, parsed.data.procedureId)) return unknownProcedure();
  // Its recording's build unless the writer chose another or none (build-link.server.ts).
  const buildId = await newMarkBuildId(db(), recordingId, parsed.data.buildNumber).catch(refusedBuild);
  if (buildId instanceof Response) return buildId;
  const [row] = await db()
    .insert(marks)
    .values({
      recordingId,
      tStart: parsed.data.tStart,
      tEnd: parsed.data.tEnd ?? null,
      text: parsed.data.text,
      tags: parsed.data.tags,
      procedureId: parsed.data.procedureId ?? null,
      buildId,
      createdBy: user.id,
    })
    .returning();
  return Response.json({ mark: await withBuildNumber(row) }, { status: 201 });
}

/** An unknown build number as the API's 422 on `buildNumber`; anything else goes on. */
function refusedBuild(err: unknown): Response {
  if (err instanceof DomainError) return domainErrorJson(err);
  throw err;
}

/** A mark as the API answers it: its build by number (null for none), not by id. */
async function withBuildNumber<T extends { buildId: string | null }>(row: T) {
  const { buildId, ...rest } = row;
  const [b] = buildId ? await db().select({ number: builds.number }).from(builds).where(eq(builds.id, buildId)) : [];
  return { ...rest, buildNumber: b?.number ?? null };
}

async function markOr404(request: Request, recordingId: string, markId: string) {
  if (!z.string().uuid().safeParse(markId).success) notFound(request, "mark");
  const [m] = await db()
    .select()
    .from(marks)
    .where(and(eq(marks.id, markId), eq(marks.recordingId, recordingId)));
  if (!m) notFound(request, "mark");
  return m;
}

export async function updateMark(request: Request, user: SessionUser, recordingId: string, markId: string, body: unknown) {
  const rec = await recordingOr404(request, recordingId);
  const m = await markOr404(request, recordingId, markId);
  if (!canOnOwned(user, "mark:edit", m.createdBy)) forbidden(request, "You can change only your own marks.");
  const parsed = markPatchSchema(rec.durationS).safeParse(body);
  if (!parsed.success) return invalidInput(request, parsed.error);
  const next = { ...m, ...Object.fromEntries(Object.entries(parsed.data).filter(([, v]) => v !== undefined)) };
  if (next.tEnd != null && next.tEnd <= next.tStart) {
    return refused("tEnd", "A span must end after it starts.");
  }
  // A link kept as it was is not checked again: the author of a mark may edit its text even when
  // its procedure has since become one they may not read.
  if (parsed.data.procedureId !== m.procedureId && (await procedureUnreadable(user, parsed.data.procedureId))) return unknownProcedure();
  const build = parsed.data.buildNumber === undefined ? undefined : await resolveBuild(parsed.data.buildNumber).catch(refusedBuild);
  if (build instanceof Response) return build;
  const row = await db().transaction(async (tx) => {
    await tx
      .update(marks)
      .set({ tStart: next.tStart, tEnd: next.tEnd, text: next.text, tags: next.tags, procedureId: next.procedureId, updatedAt: new Date() })
      .where(eq(marks.id, markId));
    if (build !== undefined) await moveMark(tx, user.id, markId, build);
    const [after] = await tx.select().from(marks).where(eq(marks.id, markId));
    return after;
  });
  return Response.json({ mark: await withBuildNumber(row) });
}

export async function deleteMark(request: Request, user: SessionUser, recordingId: string, markId: string) {
  await recordingOr404(request, recordingId);
  const m = await markOr404(request, recordingId, markId);
  if (!canOnOwned(user, "mark:edit", m.createdBy)) forbidden(request, "You can delete only your own marks.");
  await db().delete(marks).where(eq(marks.id, markId));
  return new Response(null, { status: 204 });
}

export { listReadings };

// ---- readings --------------------------------------------------------------------------------

/** One reading, or `{ readings: [...] }` for the "add several" grid (all or nothing). */
export async function createReadings(request: Request, user: SessionUser, recordingId: string, body: unknown) {
  assertCan(request, user, "reading:create");
  const rec = await recordingOr404(request, recordingId);
  assertTakesReadings(rec);
  const one = readingInputSchema(rec.durationS);
  const isBatch = typeof body === "object" && body !== null && Array.isArray((body as { readings?: unknown }).readings);
  const schema = isBatch
    ? z.object({ readings: z.array(one).min(1, "Add at least one reading.").max(500, "At most 500 readings at once.") })
    : one;
  const parsed = schema.safeParse(body);
  if (!parsed.success) return invalidInput(request, parsed.error);
  const items = isBatch ? (parsed.data as { readings: z.infer<typeof one>[] }).readings : [parsed.data as z.infer<typeof one>];
  const rows = await db()
    .insert(readings)
    .values(
      items.map((r) => ({
        recordingId,
        quantity: r.quantity,
        label: r.label,
        valueEntered: r.value,
        valueDecimals: r.valueDecimals,
        unitEntered: r.unit,
        valueSi: toStoredSI(r.quantity, r.value, r.unit),
        conditions: r.conditions,
        ...r.position,
        t: r.t ?? null,
        createdBy: user.id,
      })),
    )
    .returning();
  return Response.json(isBatch ? { readings: rows } : { reading: rows[0] }, { status: 201 });
}

async function readingOr404(request: Request, recordingId: string, readingId: string) {
  if (!z.string().uuid().safeParse(readingId).success) notFound(request, "reading");
  const [r] = await db()
    .select()
    .from(readings)
    .where(and(eq(readings.id, readingId), eq(readings.recordingId, recordingId)));
  if (!r) notFound(request, "reading");
  return r;
}

export async function updateReading(request: Request, user: SessionUser, recordingId: string, readingId: string, body: unknown) {
  const rec = await recordingOr404(request, recordingId);
  const r = await readingOr404(request, recordingId, readingId);
  if (!canOnOwned(user, "reading:edit", r.createdBy)) forbidden(request, "You can change only your own readings.");
  // A patch is checked as the whole reading it makes, so a unit change is checked against the quantity.
  const merged = {
    quantity: r.quantity,
    value: r.valueEntered,
    // The decimals typed go with the stored value: a patch of the value says them anew (or they are guessed from it).
    ...(typeof body === "object" && body && "value" in body ? {} : { valueDecimals: r.valueDecimals }),
    unit: r.unitEntered,
    label: r.label,
    conditions: r.conditions,
    t: r.t,
    // The stored place goes with the stored quantity: a patch that changes the quantity says
    // the place anew (a bore's cylinder does not carry over to a torque).
    ...(typeof body === "object" && body && "quantity" in body && (body as { quantity?: unknown }).quantity !== r.quantity
      ? {}
      : positionInputOf(r)),
    ...(typeof body === "object" && body ? body : {}),
  };
  const parsed = readingInputSchema(rec.durationS).safeParse(merged);
  if (!parsed.success) return invalidInput(request, parsed.error);
  const v = parsed.data;
  const [row] = await db()
    .update(readings)
    .set({
      quantity: v.quantity,
      label: v.label,
      valueEntered: v.value,
      valueDecimals: v.valueDecimals,
      unitEntered: v.unit,
      valueSi: toStoredSI(v.quantity, v.value, v.unit),
      conditions: v.conditions,
      ...v.position,
      t: v.t ?? null,
      updatedAt: new Date(),
    })
    .where(eq(readings.id, readingId))
    .returning();
  return Response.json({ reading: row });
}

export async function deleteReading(request: Request, user: SessionUser, recordingId: string, readingId: string) {
  await recordingOr404(request, recordingId);
  const r = await readingOr404(request, recordingId, readingId);
  if (!canOnOwned(user, "reading:edit", r.createdBy)) forbidden(request, "You can delete only your own readings.");
  await db().delete(readings).where(eq(readings.id, readingId));
  return new Response(null, { status: 204 });
}
