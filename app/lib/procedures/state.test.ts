import { describe, expect, it } from "vitest";
import type { Role } from "~/lib/permissions";
import { available, decide, STATES, type RevisionState, type Transition } from "./state";

const author = { id: "u-builder", role: "builder" as Role };
const otherBuilder = { id: "u-other", role: "builder" as Role };
const editor = { id: "u-editor", role: "editor" as Role };
const apprentice = { id: "u-app", role: "apprentice" as Role };
const qc = { id: "u-qc", role: "qc" as Role };
const rev = (state: RevisionState) => ({ state, authorId: author.id });
const ctx = { changeNote: "Changed the torque pass order", reason: "Add the lube" };

const LEGAL: Record<Transition, RevisionState[]> = {
  edit: ["draft"],
  submit: ["draft"],
  withdraw: ["in_review"],
  return: ["in_review"],
  publish: ["in_review"],
  supersede: ["published"],
  discard: ["draft"],
  restore: ["published", "superseded"],
};

describe("revision state machine", () => {
  it("allows exactly the legal transitions (for an editor) and refuses every other with a reason", () => {
    for (const t of Object.keys(LEGAL) as Transition[]) {
      for (const s of STATES) {
        const d = decide(t, rev(s), editor, ctx);
        expect(d.ok, `${t} from ${s}`).toBe(LEGAL[t].includes(s));
        if (!d.ok) expect(d.reason.length).toBeGreaterThan(10);
      }
    }
  });

  it("moves to the right states", () => {
    expect(decide("submit", rev("draft"), author, ctx)).toEqual({ ok: true, to: "in_review" });
    expect(decide("return", rev("in_review"), editor, ctx)).toEqual({ ok: true, to: "draft" });
    expect(decide("publish", rev("in_review"), editor, ctx)).toEqual({ ok: true, to: "published" });
    expect(decide("supersede", rev("published"), editor)).toEqual({ ok: true, to: "superseded" });
    expect(decide("restore", rev("superseded"), author)).toEqual({ ok: true, to: "new-draft" });
  });

  it("needs a change note to submit and a reason to return", () => {
    expect(decide("submit", rev("draft"), author, { changeNote: "  " })).toMatchObject({
      ok: false,
      reason: expect.stringMatching(/change note/),
    });
    expect(decide("return", rev("in_review"), editor, { reason: "" })).toMatchObject({
      ok: false,
      reason: expect.stringMatching(/reason/),
    });
  });

  it("keeps publishing and returning to editors and admins", () => {
    for (const who of [author, apprentice, qc]) {
      expect(decide("publish", rev("in_review"), who, ctx).ok).toBe(false);
      expect(decide("return", rev("in_review"), who, ctx).ok).toBe(false);
    }
    expect(decide("publish", rev("in_review"), { id: "a", role: "admin" }, ctx).ok).toBe(true);
  });

  it("lets builders change only their own drafts; apprentices and QC none", () => {
    expect(decide("edit", rev("draft"), author).ok).toBe(true);
    expect(decide("edit", rev("draft"), otherBuilder).ok).toBe(false);
    expect(decide("edit", rev("draft"), apprentice).ok).toBe(false);
    expect(decide("edit", rev("draft"), qc).ok).toBe(false);
    expect(decide("edit", rev("draft"), editor).ok).toBe(true);
    expect(decide("restore", rev("published"), apprentice).ok).toBe(false);
  });

  it("never edits a published or superseded revision", () => {
    expect(decide("edit", rev("published"), editor)).toMatchObject({ ok: false, reason: expect.stringMatching(/new draft/) });
    expect(decide("edit", rev("superseded"), editor)).toMatchObject({ ok: false, reason: expect.stringMatching(/restore/i) });
  });

  it("refuses a restore while another revision is open, and discarding the only revision", () => {
    expect(decide("restore", rev("published"), author, { openRevisionNumber: 4 })).toMatchObject({
      ok: false,
      reason: expect.stringMatching(/Revision 4/),
    });
    expect(decide("discard", rev("draft"), author, { onlyRevision: true }).ok).toBe(false);
    expect(decide("submit", rev("draft"), null, ctx).ok).toBe(false);
  });

  it("lists what a person can do", () => {
    expect(available(rev("in_review"), editor)).toEqual(["withdraw", "return", "publish"]);
    expect(available(rev("in_review"), author)).toEqual(["withdraw"]);
    expect(available(rev("draft"), author)).toEqual(["edit", "submit", "discard"]);
    expect(available(rev("published"), apprentice)).toEqual([]);
  });
});
