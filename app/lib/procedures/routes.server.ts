/** Shared pieces of the procedure routes: find by slug (following renames), revision guards. */
import { data, redirect } from "react-router";
import type { SessionUser } from "~/lib/auth.server";
import { forbidden } from "~/lib/auth.server";
import { canOnOwned } from "~/lib/permissions";
import { positiveIntParam, slug as slugSchema } from "~/lib/edge";
import { findBySlug, revisionByNumber, type Procedure, type Revision } from "./lookup.server";

const NO_PROCEDURE = "There is no procedure at this address.";

/** The procedure at :slug; an old slug redirects (301) to the same sub-page under the new one. */
export async function procedureOr404(request: Request, slug: string): Promise<Procedure> {
  return foundOr404(request, slug, await findBySlug(slugOr404(slug))).procedure;
}

/**
 * What a look-up by :slug found, or the answer when it found none: a 404, or a 301 to the same
 * sub-page under the slug a rename moved it to.
 */
export function foundOr404<T extends object>(request: Request, slug: string, found: T | { movedTo: string } | null): T {
  if (!found) throw data({ message: NO_PROCEDURE }, { status: 404 });
  if ("movedTo" in found) {
    const u = new URL(request.url);
    const path = u.pathname.replace(/\.data$/, "");
    const rest = path.slice(`/procedures/${slug}`.length);
    throw redirect(`/procedures/${found.movedTo}${rest}${u.search}`, 301);
  }
  return found;
}

/** A :slug that cannot name a procedure is a 404 before any look-up. */
export function slugOr404(slug: string): string {
  if (!slugSchema.safeParse(slug).success) throw data({ message: NO_PROCEDURE }, { status: 404 });
  return slug;
}

export function canSeeRevision(user: SessionUser, rev: Pick<Revision, "state" | "authorId">): boolean {
  if (rev.state === "published" || rev.state === "superseded") return true;
  return canOnOwned(user, "procedure:view-drafts", rev.authorId);
}

export async function revisionOr404(
  request: Request,
  user: SessionUser,
  procedure: Procedure,
  numberParam: string | undefined,
): Promise<Revision> {
  // Digits within PostgreSQL's integer only: 2³¹ and up cannot name a revision (and made the query fail).
  const parsed = positiveIntParam.safeParse(numberParam);
  if (!parsed.success) throw data({ message: "No such revision." }, { status: 404 });
  const n = parsed.data;
  const rev = await revisionByNumber(procedure.id, n);
  if (!rev) throw data({ message: `Revision ${n} does not exist.` }, { status: 404 });
  if (!canSeeRevision(user, rev)) forbidden(request, "Drafts are open to their author and the editors.");
  return rev;
}
