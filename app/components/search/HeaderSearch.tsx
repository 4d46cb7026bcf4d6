import { useEffect, useEffectEvent, useId, useRef, useState } from "react";
import { Form, Link, useFetcher, useNavigate } from "react-router";
import { clock, KIND_LABELS, opensAtText } from "~/lib/search/highlight";
import type { SearchHit } from "~/lib/search/query.server";
import { Highlighted } from "./Highlighted";
import { ReadingMatches } from "./ReadingMatches";

type Answer = { hits?: SearchHit[]; total?: number; error?: string; reason?: string; behind?: boolean };

/** The header's search box: results as you type (debounced), grouped by kind; `/` focuses it. */
export function HeaderSearch() {
  const fetcher = useFetcher<Answer>();
  const [q, setQ] = useState("");
  const [open, setOpen] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const listId = useId();
  const navigate = useNavigate();

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement | null;
      const typing = t && (t.isContentEditable || ["INPUT", "TEXTAREA", "SELECT"].includes(t.tagName));
      if (e.key === "/" && !typing && !e.metaKey && !e.ctrlKey) {
        e.preventDefault();
        input.current?.focus();
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, []);

  // The search runs on a pause in typing: only a change of the words starts the wait again.
  const search = useEffectEvent((term: string) => fetcher.load(`/api/search?limit=12&q=${encodeURIComponent(term)}`));
  useEffect(() => {
    const term = q.trim();
    if (term.length < 2) return;
    const timer = setTimeout(() => search(term), 180);
    return () => clearTimeout(timer);
  }, [q]);

  const data = fetcher.data;
  const hits = q.trim().length >= 2 ? (data?.hits ?? []) : [];
  // Groups in a fixed order (procedures and their specs first), hits in rank order inside each.
  const groups = new Map<string, SearchHit[]>(Object.keys(KIND_LABELS).map((k) => [k, []]));
  for (const h of hits) groups.set(h.kind, [...(groups.get(h.kind) ?? []), h]);
  for (const [k, list] of groups) if (!list.length) groups.delete(k);

  return (
    <div className="relative max-w-md" onBlur={(e) => !e.currentTarget.contains(e.relatedTarget) && setOpen(false)}>
      <Form method="get" action="/search" role="search" onSubmit={() => setOpen(false)}>
        <label htmlFor="header-search" className="sr-only">
          Search the shop's knowledge
        </label>
        <input
          ref={input}
          id="header-search"
          name="q"
          type="search"
          role="combobox"
          aria-autocomplete="list"
          autoComplete="off"
          value={q}
          onChange={(e) => {
            setQ(e.target.value);
            setOpen(true);
          }}
          onFocus={() => setOpen(true)}
          onKeyDown={(e) => e.key === "Escape" && setOpen(false)}
          placeholder="Search procedures, specs, marks…"
          className="field py-1.5 pr-9 text-sm"
          aria-controls={listId}
          aria-expanded={open && hits.length > 0}
        />
        {/* The "/" shortcut is told only where there is a keyboard and a fine pointer, not on a tablet. */}
        {!q && (
          <span
            aria-hidden="true"
            className="pointer-events-none absolute top-1/2 right-2 hidden -translate-y-1/2 pointer-fine:block"
            data-testid="search-shortcut"
          >
            <kbd className="rounded border border-rule bg-paper px-1.5 font-sans text-xs text-graphite-soft">/</kbd>
          </span>
        )}
      </Form>
      {open && q.trim().length >= 2 && (
        <div
          id={listId}
          className="absolute left-0 right-0 z-30 mt-1 max-h-[70vh] overflow-auto rounded-md border border-rule bg-card shadow-lg"
          data-testid="search-dropdown"
        >
          {data?.error && <p className="px-4 py-3 text-base text-graphite-soft lg:text-sm">{data.reason ?? "Search is unavailable."}</p>}
          {!data?.error && hits.length === 0 && fetcher.state === "idle" && data && (
            <p className="px-4 py-3 text-base text-graphite-soft lg:text-sm">Nothing found for “{q.trim()}”.</p>
          )}
          {[...groups.entries()].map(([kind, list]) => (
            <section key={kind} className="border-b border-rule/70 last:border-0">
              <h3 className="bg-paper-deep/60 px-4 py-1 font-sans text-sm font-semibold uppercase tracking-wide text-graphite-soft lg:text-xs">
                {KIND_LABELS[kind] ?? kind}
              </h3>
              <ul>
                {list.map((h) => (
                  <li key={h.id}>
                    {/* Below 1024 px (a tablet) the text is a size up and each hit at least 44 px tall. */}
                    <Link
                      to={h.url}
                      reloadDocument={opensAtText(h.url)}
                      className="block min-h-11 px-4 py-2.5 text-base text-graphite no-underline hover:bg-paper lg:min-h-0 lg:py-2 lg:text-sm"
                      onClick={() => setOpen(false)}
                      data-testid="search-hit"
                    >
                      <span className="font-semibold">
                        <Highlighted text={h.title} />
                      </span>
                      {h.t != null && h.kind !== "reading" && (
                        <span className="num ml-2 text-sm text-teal lg:text-xs">at {clock(h.t)}</span>
                      )}
                      {h.context && <span className="ml-2 text-sm text-graphite-soft lg:text-xs">· {h.context}</span>}
                      {h.snippet && (
                        <span className="mt-0.5 block text-sm text-graphite-soft lg:text-xs">
                          <Highlighted text={h.snippet} />
                        </span>
                      )}
                    </Link>
                    <ReadingMatches hit={h} compact onOpen={() => setOpen(false)} />
                  </li>
                ))}
              </ul>
            </section>
          ))}
          {hits.length > 0 && (
            <button
              type="button"
              className="block min-h-11 w-full px-4 py-2.5 text-left text-base font-semibold text-teal hover:bg-paper lg:min-h-0 lg:py-2 lg:text-sm"
              onClick={() => navigate(`/search?q=${encodeURIComponent(q.trim())}`)}
            >
              All results for “{q.trim()}” →
            </button>
          )}
        </div>
      )}
    </div>
  );
}
