/** Server-side HTML of a revision's body; the read page hydrates only the calculator widgets in it. */
import { renderToStaticMarkup } from "react-dom/server";
import { renderDoc } from "~/components/procedures/DocView";
import type { CalculatorAttrs, JSONNode } from "./document";
import { walk } from "./document";
import { recordingTitles, titlesFor } from "./workflow.server";

export type Widget = { kind: "calculator"; attrs: CalculatorAttrs };

export async function renderBody(doc: JSONNode): Promise<{ html: string; widgets: Widget[] }> {
  const procIds = new Set<string>();
  const recIds = new Set<string>();
  const widgets: Widget[] = [];
  walk(doc, (n) => {
    if (n.type === "procedureLink") procIds.add(String(n.attrs?.procedureId));
    if (n.type === "videoMoment") recIds.add(String(n.attrs?.recordingId));
    if (n.type === "calculator") widgets.push({ kind: "calculator", attrs: n.attrs as CalculatorAttrs });
  });
  const [procedures, recordings] = await Promise.all([titlesFor([...procIds]), recordingTitles([...recIds])]);
  const html = renderToStaticMarkup(<>{renderDoc(doc, { procedures, recordings })}</>);
  return { html, widgets };
}
