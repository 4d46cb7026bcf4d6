import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { searchOutbox, searchWordGroups, users } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { groupProblem } from "./synonyms";

export type WordGroup = { id: string; words: string[]; updatedAt: Date; updatedBy: string | null };

/** A change that cannot be saved, with the field it belongs to and what is wrong. */
export class WordGroupError extends Error {
  constructor(
    readonly field: "words" | "form",
    message: string,
    readonly current?: WordGroup,
  ) {
    super(message);
  }
}

/** Every group, in the order of its first word, with who changed it last. */
export async function wordGroups(): Promise<WordGroup[]> {
  const rows = await db()
    .select({ id: searchWordGroups.id, words: searchWordGroups.words, updatedAt: searchWordGroups.updatedAt, updatedBy: users.name })
    .from(searchWordGroups)
    .leftJoin(users, eq(users.id, searchWordGroups.updatedBy))
    .orderBy(sql`${searchWordGroups.words}[1]`, asc(searchWordGroups.id));
  return rows;
}

/** The groups as the search service's synonyms setting wants them. */
export async function wordGroupLists(): Promise<string[][]> {
  const rows = await db().select({ words: searchWordGroups.words }).from(searchWordGroups).orderBy(asc(searchWordGroups.createdAt), asc(searchWordGroups.id));
  return rows.map((r) => r.words);
}

/** True while a change to the words waits for the search service (it was down, or is about to be asked). */
export async function wordsPending(): Promise<{ pending: boolean; lastError: string | null }> {
  const rows = await db()
    .select({ lastError: searchOutbox.lastError })
    .from(searchOutbox)
    .where(and(eq(searchOutbox.kind, "search_words"), isNull(searchOutbox.doneAt)));
  return { pending: rows.length > 0, lastError: rows.find((r) => r.lastError)?.lastError ?? null };
}

type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

async function check(tx: Tx, words: string[], selfId?: string) {
  const others = await tx.select({ id: searchWordGroups.id, words: searchWordGroups.words }).from(searchWordGroups);
  const problem = groupProblem(words, others, selfId);
  if (problem) throw new WordGroupError("words", problem);
}

export async function addWordGroup(actor: SessionUser, words: string[]): Promise<void> {
  await db().transaction(async (tx) => {
    // One writer at a time, so two people cannot put the same word into two new groups.
    await tx.execute(sql`lock table search_word_groups in share row exclusive mode`);
    await check(tx, words);
    await tx.insert(searchWordGroups).values({ words, updatedBy: actor.id });
  });
}

/**
 * Saves a group's new words, unless someone changed the group since the editor loaded it
 * (`loadedAt`): then nothing is saved and the error carries the group as it is now, so the
 * page can show both.
 */
export async function updateWordGroup(actor: SessionUser, id: string, words: string[], loadedAt: number): Promise<void> {
  await db().transaction(async (tx) => {
    await tx.execute(sql`lock table search_word_groups in share row exclusive mode`);
    const [current] = await tx.select().from(searchWordGroups).where(eq(searchWordGroups.id, id));
    if (!current) throw new WordGroupError("form", "That group was removed while you were editing it. Add your words as a new group.");
    if (current.updatedAt.getTime() !== loadedAt) {
      throw new WordGroupError("words", "Someone changed this group while you were editing it. It now reads as shown; your words are still in the field.", {
        id: current.id,
        words: current.words,
        updatedAt: current.updatedAt,
        updatedBy: null,
      });
    }
    await check(tx, words, id);
    await tx.update(searchWordGroups).set({ words, updatedBy: actor.id, updatedAt: new Date() }).where(eq(searchWordGroups.id, id));
  });
}

export async function removeWordGroup(id: string): Promise<boolean> {
  const removed = await db().delete(searchWordGroups).where(eq(searchWordGroups.id, id)).returning({ id: searchWordGroups.id });
  return removed.length > 0;
}
