import type { ProcedureDoc } from "./document";

/** The skeleton a new draft starts from: the headings most shop procedures need. */
export function starterDocument(): ProcedureDoc {
  const h = (text: string) => ({ type: "heading", attrs: { level: 2 }, content: [{ type: "text", text }] });
  return {
    type: "doc",
    content: [
      h("Why"),
      { type: "paragraph" },
      h("Tools and parts"),
      { type: "bulletList", content: [{ type: "listItem", content: [{ type: "paragraph" }] }] },
      h("Steps"),
      { type: "orderedList", attrs: { start: 1 }, content: [{ type: "listItem", content: [{ type: "paragraph" }] }] },
      h("Checks"),
      { type: "paragraph" },
    ],
  };
}
