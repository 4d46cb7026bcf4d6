/**
 * The revision state machine: Draft → In review → Published → Superseded, with "return"
 * (In review → Draft, with the editor's reason) and "withdraw" (the author takes a submitted
 * draft back). `decide` refuses every illegal transition with a reason people can read.
 */
import { can, canOnOwned, type Role } from "~/lib/permissions";

export const STATES = ["draft", "in_review", "published", "superseded"] as const;
export type RevisionState = (typeof STATES)[number];

export const STATE_LABELS: Record<RevisionState, string> = {
  draft: "Draft",
  in_review: "In review",
  published: "Published",
  superseded: "Superseded",
};

export type Transition = "edit" | "submit" | "withdraw" | "return" | "publish" | "supersede" | "discard" | "restore";
export type Actor = { id: string; role: Role };
export type RevisionFacts = { state: RevisionState; authorId: string | null };
export type Context = {
  changeNote?: string | null;
  reason?: string | null;
  /** Another revision of the same procedure is open (draft or in review). */
  openRevisionNumber?: number | null;
  /** This draft is the procedure's only revision (discarding it would leave an empty procedure). */
  onlyRevision?: boolean;
};
export type Decision = { ok: true; to: RevisionState | "removed" | "new-draft" } | { ok: false; reason: string };

const TABLE: Record<Transition, { from: RevisionState[]; to: RevisionState | "removed" | "new-draft" }> = {
  edit: { from: ["draft"], to: "draft" },
  submit: { from: ["draft"], to: "in_review" },
  withdraw: { from: ["in_review"], to: "draft" },
  return: { from: ["in_review"], to: "draft" },
  publish: { from: ["in_review"], to: "published" },
  supersede: { from: ["published"], to: "superseded" },
  discard: { from: ["draft"], to: "removed" },
  restore: { from: ["published", "superseded"], to: "new-draft" },
};

const WHY_NOT: Partial<Record<Transition, Partial<Record<RevisionState, string>>>> = {
  edit: {
    in_review: "This revision is in review; it can be changed again once the editor returns it (or you withdraw it).",
    published: "A published revision is never edited; start a new draft from it.",
    superseded: "A superseded revision is history; restore it as a new draft to work from it.",
  },
  submit: {
    in_review: "This revision is already in review.",
    published: "This revision is already published.",
    superseded: "A superseded revision cannot be submitted; restore it as a new draft first.",
  },
  publish: {
    draft: "Only a revision in review can be published; submit it first.",
    published: "This revision is already published.",
    superseded: "A superseded revision cannot be published again; restore it as a new draft and submit that.",
  },
  return: {
    draft: "Only a revision in review can be returned; this one is a draft already.",
    published: "A published revision cannot be returned; start a new draft instead.",
    superseded: "A superseded revision cannot be returned.",
  },
  withdraw: { draft: "This revision is not in review." },
  restore: {
    draft: "This revision is still a draft; open it to keep working on it.",
    in_review: "This revision is in review; it cannot be restored while the editor reviews it.",
  },
  discard: {
    in_review: "A revision in review cannot be discarded; withdraw it first.",
    published: "A published revision cannot be discarded.",
    superseded: "History is kept: a superseded revision cannot be discarded.",
  },
  supersede: { draft: "Only the published revision can be superseded." },
};

export function decide(t: Transition, rev: RevisionFacts, actor: Actor | null, ctx: Context = {}): Decision {
  if (!actor) return { ok: false, reason: "Sign in first." };
  const rule = TABLE[t];
  if (!rule.from.includes(rev.state)) {
    return { ok: false, reason: WHY_NOT[t]?.[rev.state] ?? `Cannot ${t} a revision that is ${STATE_LABELS[rev.state]}.` };
  }
  switch (t) {
    case "edit":
    case "discard":
      if (!canOnOwned(actor, "procedure:edit", rev.authorId))
        return { ok: false, reason: "Only the draft's author or an editor can change this draft." };
      if (t === "discard" && ctx.onlyRevision)
        return { ok: false, reason: "This is the procedure's only revision; there would be nothing left. Keep it and edit it instead." };
      break;
    case "submit": {
      if (!canOnOwned(actor, "procedure:edit", rev.authorId))
        return { ok: false, reason: "Only the draft's author or an editor can submit this draft." };
      const note = (ctx.changeNote ?? "").trim();
      if (note.length < 3) return { ok: false, reason: "Write a change note: what changed and why (at least a few words)." };
      if (note.length > 1000) return { ok: false, reason: "Keep the change note under 1,000 characters." };
      break;
    }
    case "withdraw":
      if (!canOnOwned(actor, "procedure:edit", rev.authorId))
        return { ok: false, reason: "Only the author or an editor can withdraw this revision." };
      break;
    case "return": {
      if (!can(actor.role, "procedure:review")) return { ok: false, reason: "Only editors and admins return drafts." };
      const reason = (ctx.reason ?? "").trim();
      if (reason.length < 3) return { ok: false, reason: "Give the author a reason for returning the draft." };
      if (reason.length > 2000) return { ok: false, reason: "Keep the reason under 2,000 characters." };
      break;
    }
    case "publish":
      if (!can(actor.role, "procedure:review")) return { ok: false, reason: "Only editors and admins publish procedures." };
      break;
    case "supersede":
      if (!can(actor.role, "procedure:review")) return { ok: false, reason: "Only publishing a newer revision supersedes this one." };
      break;
    case "restore":
      if (!can(actor.role, "procedure:draft")) return { ok: false, reason: "Your role cannot start drafts." };
      if (ctx.openRevisionNumber != null)
        return {
          ok: false,
          reason: `Revision ${ctx.openRevisionNumber} is already open as a draft or in review; finish or discard it first.`,
        };
      break;
  }
  return { ok: true, to: rule.to };
}

/** The transitions a person can take on a revision now (for the buttons). */
export function available(rev: RevisionFacts, actor: Actor | null, ctx: Context = {}): Transition[] {
  const probe: Context = { ...ctx, changeNote: "probe", reason: "probe" };
  return (["edit", "submit", "withdraw", "return", "publish", "discard", "restore"] as Transition[]).filter(
    (t) => decide(t, rev, actor, probe).ok,
  );
}
