/**
 * Server-side HTML of a revision's body; the read page hydrates only the calculator widgets in it.
 * Rendering a long page takes milliseconds of CPU, so the result is kept per revision version and
 * the current titles it shows (a procedure link shows the target's current title, a video moment
 * its recording's): a save or a rename renders anew, nothing stale is served, and a published
 * revision, which never changes, renders once per process.
 */
import { LRUCache } from "lru-cache";
import { renderToStaticMarkup } from "react-dom/server";
import { bodyWidgets, type Widget } from "~/lib/procedures/body";
import type { JSONNode } from "~/lib/procedures/document";
import { docTitles } from "~/lib/procedures/lookup.server";
import { renderDoc, type RenderContext } from "./DocView";

/** `units`: the label of every unit code the body's specs and calculators use, so that the client needs no unit tables. */
type Rendered = { html: string; widgets: Widget[]; units: Record<string, string> };

type Source = { id: string; version: number; doc: unknown };

// A few dozen bodies, at most 16 MB of HTML (UTF-16 in memory), the least recently used dropped first.
const cache = new LRUCache<string, Rendered>({
  max: 64,
  maxSize: 16 * 1024 * 1024,
  sizeCalculation: (r) => Math.max(1, r.html.length * 2),
});

/** The body of one revision, with the titles it shows already looked up (`titles`). */
export function renderRevisionBody(rev: Source, titles: RenderContext): Rendered {
  // A revision's document changes only with its version; the titles are part of the key.
  const key = JSON.stringify([rev.id, rev.version, [...titles.procedures].sort(), [...titles.recordings].sort()]);
  const hit = cache.get(key);
  if (hit) return hit;
  const doc = rev.doc as JSONNode;
  const rendered = { html: renderToStaticMarkup(renderDoc(doc, titles)), ...bodyWidgets(doc) };
  cache.set(key, rendered);
  return rendered;
}

/** The body of one revision, looking up the titles it shows. */
export async function renderBody(rev: Source): Promise<Rendered> {
  return renderRevisionBody(rev, await docTitles(rev.doc as JSONNode));
}
