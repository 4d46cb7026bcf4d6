// The stored document from sanitizing to the read view's HTML: what is kept, refused, and never rendered live.
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { renderDoc } from "./DocView";
import { blockTexts, countWords, incompleteBlocks, safeHref, sanitizeDocument, type JSONNode } from "~/lib/procedures/document";
import { structureProblem } from "~/lib/procedures/schema-check.server";

const para = (text: string, marks?: JSONNode["marks"]): JSONNode => ({
  type: "paragraph",
  content: [{ type: "text", text, ...(marks ? { marks } : {}) }],
});
const docOf = (...content: unknown[]) => ({ type: "doc", content });
const render = (doc: JSONNode) => renderToStaticMarkup(renderDoc(doc, { procedures: new Map(), recordings: new Map() }));

describe("sanitizeDocument", () => {
  it("keeps a valid document with our blocks", () => {
    const r = sanitizeDocument(
      docOf(
        { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "Steps" }] },
        { type: "caution", content: [para("Never reuse torque-to-yield studs.")] },
        { type: "spec", attrs: { id: "s1", label: "Torque", quantity: "torque", unit: "N.m", nominal: 110, min: 105, max: 115, note: "" } },
      ),
    );
    expect(r.ok).toBe(true);
    if (r.ok) expect(structureProblem(r.doc)).toBeNull();
  });

  it("refuses unknown node and mark types, and documents that are not documents", () => {
    expect(sanitizeDocument(docOf({ type: "iframe", attrs: { src: "https://x" } })).ok).toBe(false);
    expect(sanitizeDocument(docOf({ type: "paragraph", content: [{ type: "text", text: "x", marks: [{ type: "onclick" }] }] })).ok).toBe(
      false,
    );
    expect(sanitizeDocument({ type: "paragraph" }).ok).toBe(false);
    expect(sanitizeDocument("<p>hi</p>").ok).toBe(false);
    expect(sanitizeDocument(null).ok).toBe(false);
  });

  it("drops attributes outside the schema", () => {
    const r = sanitizeDocument(
      docOf(
        { type: "paragraph", attrs: { style: "x", onclick: "alert(1)" }, content: [{ type: "text", text: "a" }] },
        { type: "heading", attrs: { level: 2, class: "evil", id: "x" }, content: [{ type: "text", text: "h" }] },
      ),
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.doc.content![0].attrs).toBeUndefined();
    expect(r.doc.content![1].attrs).toEqual({ level: 2 });
  });

  it("keeps an incomplete spec block and names what it lacks in plain words; refuses values no gauge reads", () => {
    const spec = (a: Record<string, unknown>) =>
      sanitizeDocument(
        docOf({
          type: "spec",
          attrs: { id: "s", label: "Bore", quantity: "length", unit: "mm", nominal: null, min: null, max: null, ...a },
        }),
      );
    const problems = (a: Record<string, unknown>) => {
      const r = spec(a);
      expect(r.ok).toBe(true);
      return r.ok ? incompleteBlocks(r.doc).flatMap((b) => b.problems.map((p) => p.message)) : [];
    };
    expect(problems({ nominal: 88 })).toEqual([]);
    expect(problems({ unit: "N.m", nominal: 1 })).toEqual(["Choose a unit of length"]);
    expect(problems({})).toEqual(["Give a nominal value or a limit"]);
    expect(problems({ min: 2, max: 1 })).toEqual(["The minimum is above the maximum"]);
    expect(problems({ nominal: 5, min: 6, max: 7 })).toEqual(["The nominal lies outside the limits"]);
    expect(problems({ label: "", quantity: null, unit: null, nominal: 1 })).toEqual([
      "Give the spec a label",
      "Choose what the spec measures",
    ]);
    const huge = spec({ nominal: 1e308 });
    expect(huge.ok).toBe(false);
    if (!huge.ok) expect(huge.errors[0].message).toMatch(/^Spec “Bore”, nominal: .*gauge/);
    expect(spec({ label: "x".repeat(121), nominal: 1 }).ok).toBe(false);
  });

  it("lists incomplete blocks by name and place, nested ones too", () => {
    const r = sanitizeDocument(
      docOf(
        para("Torque the studs."),
        { type: "spec", attrs: { id: "a", label: "", quantity: "torque", unit: "N.m", nominal: null } },
        { type: "caution", content: [{ type: "videoMoment", attrs: { recordingId: null, start: 0, caption: "Washer seating" } }] },
        { type: "spec", attrs: { id: "b", label: "Final torque", quantity: "torque", unit: "N.m", nominal: 110 } },
      ),
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(incompleteBlocks(r.doc).map((b) => ({ path: b.path, name: b.name, problems: b.problems.map((p) => p.message) }))).toEqual([
      { path: [1], name: "Spec 1", problems: ["Give the spec a label", "Give a nominal value or a limit"] },
      { path: [2, 0], name: "Video moment 1: Washer seating", problems: ["Choose a recording"] },
    ]);
  });

  it("drops list items never filled in, and lists left empty, but keeps filled ones", () => {
    const item = (...content: JSONNode[]) => ({ type: "listItem", content });
    const r = sanitizeDocument(
      docOf(
        { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "Tools and parts" }] },
        { type: "bulletList", content: [item({ type: "paragraph" })] },
        {
          type: "orderedList",
          attrs: { start: 1 },
          content: [
            item(para("Chase the threads.")),
            item({ type: "paragraph" }),
            item(para("Blow out."), { type: "bulletList", content: [item({ type: "paragraph" })] }),
          ],
        },
      ),
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.doc.content!.map((c) => c.type)).toEqual(["heading", "orderedList"]);
    const steps = r.doc.content![1].content!;
    expect(steps).toHaveLength(2);
    expect(steps[1].content!.map((c) => c.type)).toEqual(["paragraph"]);
    expect(structureProblem(r.doc)).toBeNull();
    expect(render(r.doc)).not.toMatch(/<li><p><\/p><\/li>/);
  });

  it("gives pasted duplicate spec ids a new id", () => {
    const s = { type: "spec", attrs: { id: "dup", label: "A", quantity: "torque", unit: "N.m", nominal: 1 } };
    let n = 0;
    const r = sanitizeDocument(docOf(s, s), { newKey: () => `k${n++}` });
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.doc.content!.map((c) => c.attrs!.id)).toEqual(["dup", "k0"]);
  });

  it("checks calculator presets against the calc schemas and video moments' times", () => {
    expect(
      sanitizeDocument(
        docOf({
          type: "calculator",
          attrs: {
            kind: "preload",
            preset: { thread: "M12x1.5", torque: { value: 110, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } },
          },
        }),
      ).ok,
    ).toBe(true);
    const bad = sanitizeDocument(
      docOf({
        type: "calculator",
        attrs: {
          kind: "preload",
          preset: { thread: "M99z", torque: { value: 110, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } },
        },
      }),
    );
    expect(bad.ok && incompleteBlocks(bad.doc)[0].problems[0].message).toMatch(/^Check the calculator's inputs/);
    expect(sanitizeDocument(docOf({ type: "calculator", attrs: { kind: "rocket", preset: {} } })).ok).toBe(false);
    const id = "5eed0000-0000-4000-8000-00000000c1a9";
    expect(sanitizeDocument(docOf({ type: "videoMoment", attrs: { recordingId: id, start: 12, end: 20, caption: "x" } })).ok).toBe(true);
    const backwards = sanitizeDocument(docOf({ type: "videoMoment", attrs: { recordingId: id, start: 12, end: 5 } }));
    expect(backwards.ok && incompleteBlocks(backwards.doc)[0].problems.map((p) => p.message)).toEqual([
      "The end must come after the start",
    ]);
    // Not a recording id: stored as no recording at all, and the block asks for one.
    const odd = sanitizeDocument(docOf({ type: "videoMoment", attrs: { recordingId: "../../etc/passwd", start: 1 } }));
    expect(odd.ok && odd.doc.content![0].attrs!.recordingId).toBeNull();
    expect(odd.ok && incompleteBlocks(odd.doc)[0].problems.map((p) => p.message)).toEqual(["Choose a recording"]);
    expect(sanitizeDocument(docOf({ type: "procedureLink", attrs: { procedureId: "javascript:alert(1)" } })).ok).toBe(false);
  });

  it("refuses documents that are too deep or too large", () => {
    let deep: unknown = para("x");
    for (let i = 0; i < 40; i++) deep = { type: "blockquote", content: [deep] };
    expect(sanitizeDocument(docOf(deep)).ok).toBe(false);
    expect(sanitizeDocument(docOf(...Array.from({ length: 11_000 }, () => para("x")))).ok).toBe(false);
  });
});

describe("links", () => {
  it.each([
    ["https://example.com/a", true],
    ["http://example.com", true],
    ["mailto:priya@larkspur.example", true],
    ["/procedures/head-studs", true],
    ["#steps", true],
    ["javascript:alert(1)", false],
    ["JaVaScRiPt:alert(1)", false],
    [" javascript:alert(1)", false],
    ["java\tscript:alert(1)", false],
    ["java\nscript:alert(1)", false],
    ["\u0001javascript:alert(1)", false],
    ["data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==", false],
    ["vbscript:msgbox(1)", false],
    ["file:///etc/passwd", false],
    ["//evil.example/x", false],
    ["\\\\evil.example", false],
    ["example.com", false],
  ])("%s → %s", (href, ok) => {
    expect(safeHref(href) !== null).toBe(ok);
  });
});

// At least 20 XSS vectors: none may reach the rendered HTML.
const VECTORS: unknown[] = [
  para("<script>alert(1)</script>"),
  para("<img src=x onerror=alert(1)>"),
  para('"><svg onload=alert(1)>'),
  para("</p><iframe src=javascript:alert(1)>"),
  para("click", [{ type: "link", attrs: { href: "javascript:alert(1)" } }]),
  para("click", [{ type: "link", attrs: { href: "JAVASCRIPT:alert(1)" } }]),
  para("click", [{ type: "link", attrs: { href: "java\u0000script:alert(1)" } }]),
  para("click", [{ type: "link", attrs: { href: "data:text/html,<script>alert(1)</script>" } }]),
  para("click", [{ type: "link", attrs: { href: "vbscript:msgbox(1)" } }]),
  para("click", [{ type: "link", attrs: { href: 'https://ok.example" onmouseover="alert(1)' } }]),
  para("click", [{ type: "link", attrs: { href: "https://ok.example", onclick: "alert(1)", target: "_self" } }]),
  {
    type: "paragraph",
    attrs: { onclick: "alert(1)", style: "background:url(javascript:alert(1))" },
    content: [{ type: "text", text: "a" }],
  },
  { type: "heading", attrs: { level: '2 onmouseover="alert(1)"' }, content: [{ type: "text", text: "h" }] },
  { type: "codeBlock", attrs: { language: '"><script>alert(1)</script>' }, content: [{ type: "text", text: "code" }] },
  { type: "orderedList", attrs: { start: '1" onclick="alert(1)' }, content: [{ type: "listItem", content: [para("a")] }] },
  {
    type: "spec",
    attrs: {
      id: 's"><script>alert(1)</script>',
      label: "<script>alert(1)</script>",
      quantity: "torque",
      unit: "N.m",
      nominal: 1,
      note: "<img src=x onerror=alert(1)>",
    },
  },
  {
    type: "calculator",
    attrs: {
      kind: "preload",
      title: "<script>alert(1)</script>",
      preset: { thread: "M12x1.5", torque: { value: 110, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } },
    },
  },
  { type: "videoMoment", attrs: { recordingId: "5eed0000-0000-4000-8000-00000000c1a9", start: 1, caption: "<script>alert(1)</script>" } },
  {
    type: "table",
    content: [
      {
        type: "tableRow",
        content: [
          { type: "tableCell", attrs: { colspan: '1" onclick="alert(1)', style: "x" }, content: [para("<b onmouseover=alert(1)>x</b>")] },
        ],
      },
    ],
  },
  { type: "caution", content: [para("<a href=javascript:alert(1)>x</a>")] },
  { type: "paragraph", content: [{ type: "text", text: "x", marks: [{ type: "bold", attrs: { onclick: "alert(1)" } }] }] },
  { type: "blockquote", content: [para("<style>body{background:url(javascript:alert(1))}</style>")] },
];

describe("XSS", () => {
  it(`renders none of ${VECTORS.length} vectors as live HTML`, () => {
    expect(VECTORS.length).toBeGreaterThanOrEqual(20);
    for (const v of VECTORS) {
      const r = sanitizeDocument(docOf(v));
      if (!r.ok) continue; // refused outright: nothing stored, nothing rendered
      const html = render(r.doc);
      // Only real tags matter: text like "&lt;script&gt;" is escaped and inert.
      const tags = html.match(/<[^>]+>/g) ?? [];
      for (const tag of tags) {
        expect(tag).not.toMatch(/^<\/?(script|img|svg|iframe|style|b|object|embed)\b/i);
        expect(tag).not.toMatch(/\son[a-z]+=/i);
        expect(tag).not.toMatch(/(href|src)="\s*(javascript|data|vbscript):/i);
        expect(tag).not.toMatch(/\sstyle=/i);
      }
      expect(html).not.toContain("<script");
    }
  });

  it("refuses raw HTML nodes and unknown blocks instead of storing them", () => {
    for (const t of ["html", "rawHtml", "script", "iframe", "image", "embed"]) {
      expect(sanitizeDocument(docOf({ type: t, attrs: { html: "<script>alert(1)</script>", src: "javascript:alert(1)" } })).ok).toBe(false);
    }
  });
});

describe("plain text per block", () => {
  it("gives one block per paragraph, list item, spec and calculator, with links resolved", () => {
    const id = "0b7f3d5e-1c44-4f7b-9a34-6f8d2e1a0c11";
    const doc = docOf(
      { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "Steps" }] },
      {
        type: "orderedList",
        content: [
          { type: "listItem", content: [para("Clean the threads.")] },
          {
            type: "listItem",
            content: [
              {
                type: "paragraph",
                content: [
                  { type: "text", text: "See " },
                  { type: "procedureLink", attrs: { procedureId: id } },
                ],
              },
            ],
          },
        ],
      },
      { type: "caution", content: [para("Do not reuse studs.")] },
      { type: "spec", attrs: { id: "s1", label: "Torque", quantity: "torque", unit: "N.m", nominal: 110 } },
    ) as JSONNode;
    const blocks = blockTexts(doc, (x) => (x === id ? "Thread chasing" : undefined));
    expect(blocks.map((b) => b.text)).toEqual([
      "## Steps",
      "• Clean the threads.",
      "• See → Thread chasing",
      "Caution: Do not reuse studs.",
      "Spec: Torque — nominal 110 N.m",
    ]);
    expect(blocks[4]).toMatchObject({ type: "spec", key: "s1" });
    expect(countWords(doc)).toBe(9);
  });
});
