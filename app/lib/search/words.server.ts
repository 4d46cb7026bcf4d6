import { and, eq, isNull, sql } from "drizzle-orm";
import { searchOutbox, searchWordGroups, users } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import type { SessionUser } from "~/lib/auth.server";
import { db, type Tx } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import { groupProblem, synonymsSetting } from "./synonyms";

export type WordGroup = { id: string; words: string[]; createdAt: Date; updatedAt: Date; updatedBy: string | null };

/** In the order of each group's first word (the list people read, and the examples on /search). */
const byFirstWord = [sql`${searchWordGroups.words}[1]`, searchWordGroups.id];

/** Every group, with who changed it last. */
export async function wordGroups(): Promise<WordGroup[]> {
  return db()
    .select({
      id: searchWordGroups.id,
      words: searchWordGroups.words,
      createdAt: searchWordGroups.createdAt,
      updatedAt: searchWordGroups.updatedAt,
      updatedBy: users.name,
    })
    .from(searchWordGroups)
    .leftJoin(users, eq(users.id, searchWordGroups.updatedBy))
    .orderBy(...byFirstWord);
}

export async function wordGroupLists(): Promise<string[][]> {
  const rows = await db()
    .select({ words: searchWordGroups.words })
    .from(searchWordGroups)
    .orderBy(...byFirstWord);
  return rows.map((r) => r.words);
}

/** The search words as the search service's synonyms setting. */
export async function currentSynonyms(): Promise<Record<string, string[]>> {
  return synonymsSetting(await wordGroupLists());
}

/** Whether a change to the words still waits for the search service, and why if it failed. */
export async function wordsPending(): Promise<{ pending: boolean; lastError: string | null }> {
  const rows = await db()
    .select({ lastError: searchOutbox.lastError })
    .from(searchOutbox)
    .where(and(eq(searchOutbox.kind, "search_words"), isNull(searchOutbox.doneAt)));
  return { pending: rows.length > 0, lastError: rows.find((r) => r.lastError)?.lastError ?? null };
}

// One writer at a time, so that two people cannot put the same word into two groups at once.
const lockGroups = (tx: Tx) => tx.execute(sql`lock table search_word_groups in share row exclusive mode`);

async function check(tx: Tx, words: string[], selfId?: string) {
  const others = await tx.select({ id: searchWordGroups.id, words: searchWordGroups.words }).from(searchWordGroups);
  const problem = groupProblem(words, others, selfId);
  if (problem) throw new DomainError(problem, { field: "words" });
}

export async function addWordGroup(actor: SessionUser, words: string[]): Promise<void> {
  await db().transaction(async (tx) => {
    await lockGroups(tx);
    await check(tx, words);
    const [row] = await tx.insert(searchWordGroups).values({ words, updatedBy: actor.id }).returning({ id: searchWordGroups.id });
    await audit(tx, actor.id, "add", "search_words", row.id, { words });
  });
}

/**
 * Saves a group's new words, unless someone changed the group after the editor loaded it
 * (`loadedAt`, the group's updatedAt then): nothing is saved (a 409; the page shows the group
 * as it is now, with its new time). Saving again with that time overwrites it on purpose.
 */
export async function updateWordGroup(actor: SessionUser, id: string, words: string[], loadedAt: number): Promise<void> {
  await db().transaction(async (tx) => {
    await lockGroups(tx);
    const [current] = await tx.select().from(searchWordGroups).where(eq(searchWordGroups.id, id));
    if (!current) throw new DomainError("That group was removed while you were editing it. Add your words as a new group.");
    if (current.updatedAt.getTime() !== loadedAt) {
      throw new DomainError(
        "Someone changed this group while you were editing it. It now reads as shown above; your words are still in the field. Save again to replace theirs.",
        { field: "words" },
      );
    }
    await check(tx, words, id);
    await tx.update(searchWordGroups).set({ words, updatedBy: actor.id, updatedAt: new Date() }).where(eq(searchWordGroups.id, id));
    await audit(tx, actor.id, "change", "search_words", id, { from: current.words, to: words });
  });
}

export async function removeWordGroup(actor: SessionUser, id: string): Promise<boolean> {
  return db().transaction(async (tx) => {
    await lockGroups(tx);
    const [removed] = await tx.delete(searchWordGroups).where(eq(searchWordGroups.id, id)).returning({ words: searchWordGroups.words });
    if (removed) await audit(tx, actor.id, "remove", "search_words", id, { words: removed.words });
    return Boolean(removed);
  });
}
