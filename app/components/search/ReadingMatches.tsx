import { Link } from "react-router";
import { clock } from "~/lib/search/highlight";
import type { SearchHit } from "~/lib/search/query.server";
import { Highlighted } from "./Highlighted";

/**
 * The readings of a recording that matched a search, each opening the recording at its second
 * with its row marked; then how many more matched. `compact` for the header box.
 */
export function ReadingMatches({ hit, onOpen, compact = false }: { hit: SearchHit; onOpen?: () => void; compact?: boolean }) {
  const list = hit.readings ?? [];
  if (!list.length) return null;
  return (
    <ul className={compact ? "pb-1" : "mt-1.5 space-y-0.5"} aria-label={`Matching readings in ${hit.title}`}>
      {list.map((r) => (
        <li key={r.id}>
          <Link
            to={r.url}
            onClick={onOpen}
            className={`flex min-h-11 items-center gap-3 rounded no-underline hover:bg-paper lg:min-h-0 ${compact ? "px-4 py-1.5 text-sm text-graphite lg:text-xs" : "px-2 py-1 text-sm text-graphite"}`}
            data-testid="search-reading"
          >
            <span className="num w-12 shrink-0 text-teal">{r.t != null ? clock(r.t) : "–"}</span>
            <span className="num">
              <Highlighted text={r.text} />
            </span>
          </Link>
        </li>
      ))}
      {hit.moreReadings ? (
        <li className={`text-graphite-soft ${compact ? "px-4 py-1 text-sm lg:text-xs" : "px-2 text-sm"}`}>
          and {hit.moreReadings} more reading{hit.moreReadings === 1 ? "" : "s"} in this recording
        </li>
      ) : null}
    </ul>
  );
}
