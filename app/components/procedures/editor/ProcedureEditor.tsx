import { Table, TableCell, TableHeader, TableRow } from "@tiptap/extension-table";
import Placeholder from "@tiptap/extension-placeholder";
import { EditorContent, useEditor, type Editor } from "@tiptap/react";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { Node as PMNode } from "@tiptap/pm/model";
import { GapCursor } from "@tiptap/pm/gapcursor";
import { NodeSelection, Selection, TextSelection, type EditorState, type Transaction } from "@tiptap/pm/state";
import type { EditorView } from "@tiptap/pm/view";
import { Form, useBeforeUnload, useBlocker, useFetcher, useNavigation } from "react-router";
import { DEFAULT_PRESETS, type CalcKind } from "~/lib/procedures/calc-presets";
import { blockTexts, incompleteBlocks, newSpecKey, type IncompleteBlock, type JSONNode } from "~/lib/procedures/document";
import { starterKit } from "~/lib/procedures/extensions";
import { AREA_LABELS, AREAS } from "~/lib/procedures/areas";
const AREA_OPTIONS = AREAS.map((value) => ({ value, label: AREA_LABELS[value] }));
import { EditorSharedContext } from "./context";
import { editorNodes } from "./nodeViews";
import { documentNonce } from "~/lib/csp";

export type DraftInitial = {
  id: string;
  procedureId: string;
  number: number;
  version: number;
  title: string;
  summary: string;
  area: string;
  tags: string[];
  doc: unknown;
  titles: Record<string, { title: string; slug: string }>;
};

type SaveReply =
  | { ok: true; version: number; savedAt: string; warnings: { path: string; message: string }[]; incomplete: IncompleteBlock[] }
  | {
      error: "conflict";
      message: string;
      copyId: string;
      current: {
        version: number;
        title: string;
        summary: string;
        area: string;
        tags: string[];
        doc: unknown;
        updatedAt: string;
        savedBy: string | null;
      };
    }
  | { error: "invalid input"; issues: { path: string; message: string }[] }
  | { ok?: undefined; error: "forbidden" | "refused" | "not found"; reason?: string };

type Status =
  | { kind: "saved"; at: Date | null }
  | { kind: "dirty" }
  | { kind: "saving" }
  | { kind: "error"; message: string }
  | { kind: "conflict" };

const AUTOSAVE_MS = 1200;

/**
 * Where a new block goes: where the cursor is. A selected block (spec, calculator…) is not
 * replaced: the new one goes after it. In an empty paragraph the block takes its place; at the
 * start or end of a paragraph it goes before or after it; in the middle the paragraph is split
 * there (`split`: the cursor's position, the text before staying above). `at` is a position
 * between blocks (or the empty paragraph's range); null means "replace the selected text".
 */
function blockInsertPoint(state: EditorState): { at: number | { from: number; to: number }; split?: number } | null {
  const sel = state.selection;
  if (sel instanceof NodeSelection) return { at: sel.to };
  const { $from, empty } = sel;
  if (!empty || !$from.parent.isTextblock || $from.depth === 0) return null;
  if ($from.parent.content.size === 0) return { at: { from: $from.before(), to: $from.after() } };
  if ($from.parentOffset === $from.parent.content.size) return { at: $from.after() };
  if ($from.parentOffset === 0) return { at: $from.before() };
  return { at: $from.pos + 1, split: $from.pos };
}

/**
 * Puts `node` where the cursor is, in one step of the history, and leaves no empty paragraph
 * behind: the cursor goes to the start of the text that follows the block (the second half of
 * a split paragraph, or the next paragraph). Only a block that ends the document (or its list
 * item, caution…) gets a paragraph after it, the one TipTap's trailing node would add, so there
 * is a place to type; before another block the cursor waits in the gap between the two, where
 * typing starts a paragraph.
 */
function insertBlockAt(tr: Transaction, point: NonNullable<ReturnType<typeof blockInsertPoint>>, node: PMNode) {
  if (point.split != null) tr.split(point.split);
  let start: number;
  if (typeof point.at === "number") {
    start = point.at;
    tr.insert(start, node);
  } else {
    start = point.at.from;
    tr.replaceWith(point.at.from, point.at.to, node);
  }
  const end = start + node.nodeSize;
  const $end = tr.doc.resolve(end);
  const after = $end.nodeAfter;
  const paragraph = tr.doc.type.schema.nodes.paragraph;
  const next = after && Selection.findFrom($end, 1, true);
  if (!after && $end.parent.canReplaceWith($end.index(), $end.index(), paragraph)) {
    tr.insert(end, paragraph.create());
    tr.setSelection(TextSelection.create(tr.doc, end + 1));
  } else if (after && next && next.from < end + after.nodeSize) {
    tr.setSelection(next); // the first place to type in what follows
  } else if (after?.isAtom) {
    tr.setSelection(new GapCursor($end));
  } else {
    tr.setSelection(NodeSelection.create(tr.doc, start));
  }
  return tr.scrollIntoView();
}

/**
 * A press in the blank space below the last block puts the cursor at the end, in the trailing
 * paragraph (made if the last block is not a paragraph), rather than wherever the browser guesses.
 */
function writeBelowLastBlock(view: EditorView, event: MouseEvent, beside = false): boolean {
  const last = view.dom.lastElementChild;
  if ((!beside && event.target !== view.dom) || event.button !== 0 || !last || event.clientY <= last.getBoundingClientRect().bottom)
    return false;
  event.preventDefault();
  const { doc, schema } = view.state;
  const tr = view.state.tr;
  if (doc.lastChild?.type.name !== "paragraph") tr.insert(doc.content.size, schema.nodes.paragraph.create());
  tr.setSelection(TextSelection.create(tr.doc, tr.doc.content.size - 1));
  view.dispatch(tr.scrollIntoView());
  view.focus();
  return true;
}

/** A press beside the text (right of its measure) acts as a press at the same height inside it. */
function writeBeside(view: EditorView, event: MouseEvent) {
  const rect = view.dom.getBoundingClientRect();
  if (event.button !== 0 || event.clientX < rect.right) return;
  event.preventDefault();
  const last = view.dom.lastElementChild;
  if (!last || event.clientY > last.getBoundingClientRect().bottom) {
    writeBelowLastBlock(view, new MouseEvent("mousedown", { clientX: rect.left + 1, clientY: event.clientY }), true);
    return;
  }
  const hit = view.posAtCoords({ left: rect.right - 28, top: event.clientY });
  if (!hit) return;
  view.dispatch(view.state.tr.setSelection(TextSelection.near(view.state.doc.resolve(hit.pos))));
  view.focus();
}

/** The document position of the node at `path` (child indices from the top). */
function positionOf(doc: PMNode, path: number[]): number | null {
  let pos = 0;
  let node = doc;
  for (const [depth, i] of path.entries()) {
    if (i >= node.childCount) return null;
    pos += depth === 0 ? 0 : 1;
    for (let k = 0; k < i; k++) pos += node.child(k).nodeSize;
    node = node.child(i);
  }
  return pos;
}

/** Selects an incomplete block, scrolls to it and puts the focus on its first missing field. */
function goToBlock(editor: Editor, block: IncompleteBlock) {
  const pos = positionOf(editor.state.doc, block.path);
  if (pos == null) return;
  editor.view.dispatch(editor.state.tr.setSelection(NodeSelection.create(editor.state.doc, pos)));
  const dom = editor.view.nodeDOM(pos) as HTMLElement | null;
  const frame = dom?.matches?.("[data-block]") ? dom : dom?.querySelector<HTMLElement>("[data-block]");
  if (!frame) return;
  const field = frame.querySelector<HTMLElement>(`[data-field="${block.problems[0]?.field}"]`) ?? frame;
  frame.scrollIntoView({ block: "center" });
  field.focus({ preventScroll: true });
}

function Btn({
  onClick,
  active,
  label,
  children,
  disabled,
}: {
  onClick: () => void;
  active?: boolean;
  label: string;
  children: React.ReactNode;
  disabled?: boolean;
}) {
  return (
    <button
      type="button"
      onMouseDown={(e) => e.preventDefault()}
      onClick={onClick}
      aria-pressed={active}
      aria-label={label}
      title={label}
      disabled={disabled}
      className={`rounded px-2 py-1 text-sm font-semibold ${active ? "bg-graphite text-paper" : "text-graphite hover:bg-paper-deep"} disabled:opacity-40`}
    >
      {children}
    </button>
  );
}

function LinkPicker({
  editor,
  procedureId,
  onPick,
  onClose,
}: {
  editor: Editor;
  procedureId: string;
  onPick: (r: { id: string; title: string; slug: string }) => void;
  onClose: () => void;
}) {
  // The picker opens on the author's press: its search field takes the focus, as a menu would.
  const search = useRef<HTMLInputElement>(null);
  useEffect(() => search.current?.focus(), []);
  const [q, setQ] = useState("");
  const [results, setResults] = useState<{ id: string; title: string; slug: string; areaLabel: string }[]>([]);
  useEffect(() => {
    const ctl = new AbortController();
    const t = setTimeout(() => {
      fetch(`/api/procedures/titles?q=${encodeURIComponent(q)}&except=${procedureId}`, { signal: ctl.signal })
        .then((r) => r.json())
        .then((j) => setResults(j.results))
        .catch(() => {});
    }, 150);
    return () => {
      clearTimeout(t);
      ctl.abort();
    };
  }, [q, procedureId]);
  return (
    <div
      className="absolute left-0 top-full z-20 mt-1 w-80 rounded-md border border-rule bg-card p-2 shadow-lg"
      role="dialog"
      aria-label="Link a procedure"
    >
      <input
        ref={search}
        className="field py-1 text-sm"
        placeholder="Search procedure titles…"
        value={q}
        onChange={(e) => setQ(e.target.value)}
        aria-label="Search procedure titles"
        onKeyDown={(e) => e.key === "Escape" && onClose()}
      />
      <ul className="mt-1 max-h-60 overflow-auto text-sm">
        {results.map((r) => (
          <li key={r.id}>
            <button
              type="button"
              className="w-full rounded px-2 py-1 text-left hover:bg-paper-deep"
              onClick={() => {
                onPick(r);
                editor
                  .chain()
                  .focus()
                  .insertContent({ type: "procedureLink", attrs: { procedureId: r.id } })
                  .insertContent(" ")
                  .run();
                onClose();
              }}
            >
              {r.title} <span className="text-xs text-graphite-soft">· {r.areaLabel}</span>
            </button>
          </li>
        ))}
        {results.length === 0 && <li className="px-2 py-1 text-graphite-soft">No procedure matches.</li>}
      </ul>
    </div>
  );
}

function Toolbar({
  editor,
  procedureId,
  rememberTitle,
}: {
  editor: Editor;
  procedureId: string;
  rememberTitle: (id: string, t: { title: string; slug: string }) => void;
}) {
  const [picker, setPicker] = useState(false);
  const [, force] = useState(0);
  useEffect(() => {
    const f = () => force((n) => n + 1);
    editor.on("transaction", f);
    return () => {
      editor.off("transaction", f);
    };
  }, [editor]);
  const c = () => editor.chain().focus();
  const insertBlock = (content: Record<string, unknown>): boolean => {
    const point = blockInsertPoint(editor.state);
    if (!point) return c().insertContent(content).run();
    return c()
      .command(({ tr }) => {
        insertBlockAt(tr, point, editor.schema.nodeFromJSON(content));
        return true;
      })
      .run();
  };
  const insertCalc = (kind: CalcKind) => insertBlock({ type: "calculator", attrs: { kind, title: "", preset: DEFAULT_PRESETS[kind] } });
  const setLink = () => {
    const prev = editor.getAttributes("link").href as string | undefined;
    const href = window.prompt("Link address (https://…, mailto:…, or /path in Benchreel). Leave empty to remove.", prev ?? "https://");
    if (href === null) return;
    if (href.trim() === "") c().extendMarkRange("link").unsetLink().run();
    else c().extendMarkRange("link").setLink({ href: href.trim() }).run();
  };
  return (
    <div
      className="sticky top-0 z-10 flex flex-wrap items-center gap-0.5 border-b border-rule bg-card/95 px-2 py-1 backdrop-blur"
      role="toolbar"
      aria-label="Formatting and blocks"
    >
      <Btn label="Bold" active={editor.isActive("bold")} onClick={() => c().toggleBold().run()}>
        <b>B</b>
      </Btn>
      <Btn label="Italic" active={editor.isActive("italic")} onClick={() => c().toggleItalic().run()}>
        <i>I</i>
      </Btn>
      <Btn label="Strike through" active={editor.isActive("strike")} onClick={() => c().toggleStrike().run()}>
        <s>S</s>
      </Btn>
      <Btn label="Inline code" active={editor.isActive("code")} onClick={() => c().toggleCode().run()}>
        <code>{"{}"}</code>
      </Btn>
      <Btn label="Web link" active={editor.isActive("link")} onClick={setLink}>
        Link
      </Btn>
      <span className="mx-1 h-5 w-px bg-rule" aria-hidden />
      <Btn label="Section heading" active={editor.isActive("heading", { level: 2 })} onClick={() => c().toggleHeading({ level: 2 }).run()}>
        H2
      </Btn>
      <Btn label="Sub-heading" active={editor.isActive("heading", { level: 3 })} onClick={() => c().toggleHeading({ level: 3 }).run()}>
        H3
      </Btn>
      <Btn label="Bulleted list" active={editor.isActive("bulletList")} onClick={() => c().toggleBulletList().run()}>
        • List
      </Btn>
      <Btn label="Numbered steps" active={editor.isActive("orderedList")} onClick={() => c().toggleOrderedList().run()}>
        1. Steps
      </Btn>
      <Btn label="Quote" active={editor.isActive("blockquote")} onClick={() => c().toggleBlockquote().run()}>
        “ ”
      </Btn>
      <Btn label="Table" onClick={() => c().insertTable({ rows: 3, cols: 3, withHeaderRow: true }).run()}>
        Table
      </Btn>
      {editor.isActive("table") && (
        <>
          <Btn label="Add row" onClick={() => c().addRowAfter().run()}>
            +row
          </Btn>
          <Btn label="Add column" onClick={() => c().addColumnAfter().run()}>
            +col
          </Btn>
          <Btn label="Delete table" onClick={() => c().deleteTable().run()}>
            ×table
          </Btn>
        </>
      )}
      <Btn label="Undo" onClick={() => c().undo().run()} disabled={!editor.can().undo()}>
        ↶
      </Btn>
      <Btn label="Redo" onClick={() => c().redo().run()} disabled={!editor.can().redo()}>
        ↷
      </Btn>
      <span className="mx-1 h-5 w-px bg-rule" aria-hidden />
      <span className="px-1 text-xs font-semibold uppercase tracking-wide text-brass">Insert</span>
      <span className="relative">
        <Btn label="Procedure link" onClick={() => setPicker((p) => !p)} active={picker}>
          Procedure link
        </Btn>
        {picker && (
          <LinkPicker editor={editor} procedureId={procedureId} onPick={(r) => rememberTitle(r.id, r)} onClose={() => setPicker(false)} />
        )}
      </span>
      <Btn
        label="Spec"
        onClick={() =>
          insertBlock({
            type: "spec",
            attrs: { id: newSpecKey(), label: "", quantity: "torque", unit: "N.m", nominal: null, min: null, max: null, note: "" },
          })
        }
      >
        Spec
      </Btn>
      <Btn
        label="Caution"
        active={editor.isActive("caution")}
        onClick={() => (editor.isActive("caution") ? c().lift("caution").run() : c().wrapIn("caution").run())}
      >
        Caution
      </Btn>
      <Btn label="Preload calculator" onClick={() => insertCalc("preload")}>
        Preload
      </Btn>
      <Btn label="Bore distortion calculator" onClick={() => insertCalc("distortion")}>
        Bore distortion
      </Btn>
      <Btn label="Clearances calculator" onClick={() => insertCalc("clearance")}>
        Clearances
      </Btn>
      <Btn
        label="Video moment"
        onClick={() => insertBlock({ type: "videoMoment", attrs: { recordingId: null, start: 0, end: null, caption: "" } })}
      >
        Video moment
      </Btn>
    </div>
  );
}

const sentence = (i: { message: string }) => i.message.charAt(0).toUpperCase() + i.message.slice(1);
const blocksText = (n: number) => `${n} block${n === 1 ? "" : "s"}`;

/** `submitTo` is the revision page whose action takes `intent=submit` with the change note. */
export function ProcedureEditor({ initial, submitTo }: { initial: DraftInitial; submitTo: string }) {
  const [title, setTitle] = useState(initial.title);
  const [summary, setSummary] = useState(initial.summary);
  const [area, setArea] = useState(initial.area);
  const [tags, setTags] = useState(initial.tags.join(", "));
  const [titles, setTitles] = useState(initial.titles);
  const [status, setStatus] = useState<Status>({ kind: "saved", at: null });
  const [issues, setIssues] = useState<{ path: string; message: string }[]>([]);
  const [conflict, setConflict] = useState<Extract<SaveReply, { error: "conflict" }> | null>(null);
  const version = useRef(initial.version);
  const settling = useRef(false);
  // "Submit for review" pressed while changes were unsaved: submit once they are.
  const [submitPending, setSubmitPending] = useState(false);
  const submitForm = useRef<HTMLFormElement>(null);
  const missingDialog = useRef<HTMLDialogElement>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const pendingAgain = useRef(false);
  const fetcher = useFetcher<SaveReply>();
  const rememberTitle = useCallback((id: string, t: { title: string; slug: string }) => setTitles((m) => ({ ...m, [id]: t })), []);

  const editor = useEditor({
    immediatelyRender: false,
    // TipTap adds a <style> of base styles; the page's Content-Security-Policy wants its nonce.
    injectNonce: documentNonce(),
    // TipTap's trailing node keeps a paragraph after the last block, so a click below it has a place to type.
    extensions: [
      starterKit.configure({ trailingNode: {} }),
      Table.configure({ resizable: false }),
      TableRow,
      TableHeader,
      TableCell,
      ...editorNodes,
      Placeholder.configure({ placeholder: "Write the step, or insert a block from the toolbar…" }),
    ],
    content: initial.doc as JSONNode,
    editorProps: {
      attributes: { class: "proc-body prose-proc", "aria-label": "Procedure text", "data-testid": "editor" },
      handleDOMEvents: { mousedown: (view, event) => writeBelowLastBlock(view, event) },
    },
    // Opening the page adds the trailing paragraph at once; that is not a change of the author's.
    onCreate: ({ editor: e }) => {
      settling.current = true;
      e.view.dispatch(e.state.tr.setMeta("addToHistory", false));
      settling.current = false;
    },
    onUpdate: () => {
      if (!settling.current) markDirty();
    },
  });
  const [incomplete, setIncomplete] = useState<IncompleteBlock[]>([]);
  useEffect(() => {
    if (!editor) return;
    const f = () => setIncomplete(incompleteBlocks(editor.getJSON() as JSONNode));
    f();
    editor.on("update", f);
    return () => {
      editor.off("update", f);
    };
  }, [editor]);

  const dirty = status.kind === "dirty" || status.kind === "saving" || status.kind === "error" || status.kind === "conflict";

  const save = useCallback(() => {
    if (!editor) return;
    if (fetcher.state !== "idle") {
      pendingAgain.current = true;
      return;
    }
    setStatus({ kind: "saving" });
    fetcher.submit({ baseVersion: version.current, title, summary, area, tags, doc: editor.getJSON() } as never, {
      method: "post",
      action: `/api/procedures/revisions/${initial.id}`,
      encType: "application/json",
    });
  }, [editor, fetcher, title, summary, area, tags, initial.id]);

  const saveRef = useRef(save);
  saveRef.current = save;
  function markDirty() {
    setStatus((s) => (s.kind === "conflict" ? s : { kind: "dirty" }));
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => saveRef.current(), AUTOSAVE_MS);
  }

  const first = useRef(true);
  // biome-ignore lint/correctness/useExhaustiveDependencies: runs when a field changes; markDirty is a new function every render and only schedules the save
  useEffect(() => {
    if (first.current) {
      first.current = false;
      return;
    }
    markDirty();
  }, [title, summary, area, tags]);

  useEffect(() => {
    if (fetcher.state !== "idle" || !fetcher.data) return;
    const d = fetcher.data;
    if ("ok" in d && d.ok) {
      version.current = d.version;
      setIssues(d.warnings ?? []);
      if (pendingAgain.current) {
        pendingAgain.current = false;
        saveRef.current();
      } else setStatus((s) => (s.kind === "saving" ? { kind: "saved", at: new Date(d.savedAt) } : s));
      return;
    }
    setSubmitPending(false);
    if (!("error" in d)) {
      setStatus({ kind: "error", message: "Not saved: unexpected answer from the server." });
    } else if (d.error === "conflict") {
      setConflict(d as Extract<SaveReply, { error: "conflict" }>);
      setStatus({ kind: "conflict" });
    } else if (d.error === "invalid input") {
      const iss = (d as { issues: { path: string; message: string }[] }).issues;
      setIssues(iss);
      setStatus({ kind: "error", message: "Not saved: see the problem below; your text stays here." });
    } else {
      setStatus({ kind: "error", message: `Not saved: ${(d as { reason?: string }).reason ?? d.error}` });
    }
  }, [fetcher.state, fetcher.data]);

  useBeforeUnload(
    useCallback(
      (e) => {
        if (dirty) {
          e.preventDefault();
          e.returnValue = "";
        }
      },
      [dirty],
    ),
  );
  const blocker = useBlocker(({ currentLocation, nextLocation }) => dirty && currentLocation.pathname !== nextLocation.pathname);
  useEffect(() => {
    if (blocker.state === "blocked") {
      if (window.confirm("This draft has changes that are not saved yet. Leave anyway?")) blocker.proceed();
      else blocker.reset();
    }
  }, [blocker]);

  // After the blocker has seen the saved state (effects run in order), so leaving is not held up.
  useEffect(() => {
    if (submitPending && status.kind === "saved") {
      setSubmitPending(false);
      submitForm.current?.requestSubmit();
    }
  }, [submitPending, status]);

  const theirs = useMemo(() => (conflict ? blockTexts(conflict.current.doc as JSONNode).slice(0, 40) : []), [conflict]);

  const takeTheirs = () => {
    if (!conflict || !editor) return;
    const cur = conflict.current;
    version.current = cur.version;
    editor.commands.setContent(cur.doc as JSONNode, { emitUpdate: false });
    first.current = true;
    setTitle(cur.title);
    setSummary(cur.summary);
    setArea(cur.area);
    setTags(cur.tags.join(", "));
    setConflict(null);
    setIncomplete(incompleteBlocks(editor.getJSON() as JSONNode));
    setStatus({ kind: "saved", at: new Date(cur.updatedAt) });
  };
  const keepMine = () => {
    if (!conflict) return;
    version.current = conflict.current.version;
    setConflict(null);
    setStatus({ kind: "dirty" });
    setTimeout(() => saveRef.current(), 0);
  };

  const busy = useNavigation().state !== "idle";
  // Review needs every block complete and the last changes saved: list what is missing, or save first.
  const onSubmit = (e: React.FormEvent<HTMLFormElement>) => {
    if (!editor) return e.preventDefault();
    const missing = incompleteBlocks(editor.getJSON() as JSONNode);
    if (missing.length) {
      e.preventDefault();
      setIncomplete(missing);
      missingDialog.current?.showModal();
      return;
    }
    if (status.kind === "conflict") return e.preventDefault(); // settle the conflict above first
    if (status.kind !== "saved") {
      e.preventDefault();
      setSubmitPending(true);
      if (timer.current) clearTimeout(timer.current);
      if (status.kind !== "saving") save();
    }
  };

  const statusText =
    status.kind === "saved"
      ? status.at
        ? `Saved ${status.at.toLocaleTimeString("en-GB", { hour: "2-digit", minute: "2-digit", second: "2-digit" })}`
        : "No changes yet"
      : status.kind === "saving"
        ? "Saving…"
        : status.kind === "dirty"
          ? "Unsaved changes"
          : status.kind === "conflict"
            ? "Not saved: conflict"
            : status.message;

  return (
    <EditorSharedContext.Provider value={{ titles, rememberTitle, procedureId: initial.procedureId }}>
      <div className="space-y-4">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <p className="text-sm" role="status" aria-live="polite">
            <span
              className={`font-semibold ${status.kind === "error" || status.kind === "conflict" ? "text-spec-red" : status.kind === "saved" ? "text-ok" : "text-brass"}`}
              data-testid="save-status"
            >
              {statusText}
            </span>
            {incomplete.length > 0 && status.kind !== "error" && status.kind !== "conflict" && (
              <span className="text-graphite-soft" data-testid="incomplete-count">
                {" "}
                · {blocksText(incomplete.length)} to finish before review
              </span>
            )}
          </p>
          <button
            type="button"
            className="btn py-1 text-sm"
            onClick={() => save()}
            disabled={!editor || status.kind === "saving" || status.kind === "conflict"}
          >
            Save now
          </button>
        </div>
        {conflict && (
          <div role="alert" className="rounded-lg border border-spec-red/50 bg-spec-red-soft/60 p-4 text-sm" data-testid="conflict">
            <p className="font-semibold text-spec-red">{conflict.message}</p>
            <p className="mt-1">
              Your text is still in the editor below. Their version (saved{" "}
              {new Date(conflict.current.updatedAt).toLocaleTimeString("en-GB")}):
            </p>
            <div className="mt-2 max-h-48 overflow-auto rounded border border-rule bg-card p-2 font-serif">
              <p className="font-semibold">{conflict.current.title}</p>
              {theirs.map((b) => (
                <p key={b.index}>{b.text}</p>
              ))}
            </div>
            <div className="mt-3 flex flex-wrap gap-2">
              <button type="button" className="btn" onClick={keepMine}>
                Keep mine (save over theirs)
              </button>
              <button type="button" className="btn" onClick={takeTheirs}>
                Load theirs (mine stays as a conflict copy)
              </button>
            </div>
          </div>
        )}
        <div className="card grid gap-3 p-4 md:grid-cols-[2fr_1fr]">
          <label className="md:col-span-2">
            <span className="label">Title</span>
            <input
              className="field font-serif text-lg"
              value={title}
              onChange={(e) => setTitle(e.target.value)}
              aria-invalid={issues.some((i) => i.path === "title") || undefined}
            />
          </label>
          <label>
            <span className="label">Summary</span>
            <input
              className="field"
              value={summary}
              onChange={(e) => setSummary(e.target.value)}
              placeholder="One or two sentences for the list"
            />
          </label>
          <label>
            <span className="label">Shop area</span>
            <select className="field" value={area} onChange={(e) => setArea(e.target.value)}>
              {AREA_OPTIONS.map((a) => (
                <option key={a.value} value={a.value}>
                  {a.label}
                </option>
              ))}
            </select>
          </label>
          <label className="md:col-span-2">
            <span className="label">Tags</span>
            <input className="field" value={tags} onChange={(e) => setTags(e.target.value)} placeholder="comma-separated" />
          </label>
        </div>
        {issues.length > 0 && (
          <ul className="rounded-md border border-brass/60 bg-brass-soft/50 px-4 py-2 text-sm" data-testid="save-issues">
            {issues.map((i) => (
              <li key={`${i.path}:${i.message}`}>{sentence(i)}</li>
            ))}
          </ul>
        )}
        <div className="proc-editor rounded-lg border border-rule bg-card shadow-sm">
          {editor ? (
            <Toolbar editor={editor} procedureId={initial.procedureId} rememberTitle={rememberTitle} />
          ) : (
            <div className="h-10 border-b border-rule" />
          )}
          {/* The text keeps a reading measure; a press in the card's blank space beside it still reaches the text. */}
          {/* biome-ignore lint/a11y/noStaticElementInteractions: only a pointer lands in the blank space beside the text; the keyboard is in the text already */}
          <div onMouseDown={(e) => editor && !editor.view.dom.contains(e.target as Node) && writeBeside(editor.view, e.nativeEvent)}>
            <EditorContent editor={editor} />
          </div>
          {!editor && <p className="p-6 text-graphite-soft">Loading the editor…</p>}
        </div>
        <Form ref={submitForm} method="post" action={submitTo} className="card flex flex-wrap items-end gap-3 p-4" onSubmit={onSubmit}>
          <input type="hidden" name="intent" value="submit" />
          <label className="min-w-[16rem] flex-1">
            <span className="label">Change note (for the editor and the history)</span>
            <input name="changeNote" className="field" placeholder="What changed and why" required minLength={3} />
          </label>
          <button className="btn btn-primary" type="submit" disabled={busy || !editor}>
            {submitPending ? "Saving, then submitting…" : "Submit for review"}
          </button>
        </Form>
        <dialog
          ref={missingDialog}
          aria-labelledby="missing-title"
          className="m-auto w-[min(36rem,calc(100vw-2rem))] rounded-lg border border-rule bg-card p-0 text-graphite shadow-xl backdrop:bg-graphite/40"
          data-testid="submit-missing"
        >
          <div className="p-5">
            <h2 id="missing-title" className="font-serif text-xl">
              Finish {incomplete.length === 1 ? "this block" : `these ${blocksText(incomplete.length)}`} before review
            </h2>
            <p className="mt-1 text-sm text-graphite-soft">
              Your draft is saved as it is. Review needs every block complete; choose one to go to it.
            </p>
            <ul className="mt-3 divide-y divide-rule rounded-md border border-rule">
              {incomplete.map((b) => (
                <li key={b.path.join(".")} className="px-3 py-2">
                  <button
                    type="button"
                    className="min-h-11 text-left font-semibold text-teal underline decoration-teal/40 underline-offset-2 hover:decoration-teal"
                    onClick={() => {
                      missingDialog.current?.close();
                      if (editor) goToBlock(editor, b);
                    }}
                  >
                    {b.name}
                  </button>
                  <p className="text-sm">{b.problems.map((p) => p.message).join(" · ")}</p>
                </li>
              ))}
            </ul>
            <div className="mt-4 flex justify-end">
              <button type="button" className="btn" onClick={() => missingDialog.current?.close()}>
                Keep writing
              </button>
            </div>
          </div>
        </dialog>
      </div>
    </EditorSharedContext.Provider>
  );
}
