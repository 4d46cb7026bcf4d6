import { highlightPieces } from "~/lib/search/highlight";

export function Highlighted({ text }: { text: string }) {
  return (
    <>
      {highlightPieces(text).map((p, i) =>
        p.hit ? (
          <mark key={i} className="-mx-px rounded-sm bg-brass-soft px-px text-graphite">
            {p.text}
          </mark>
        ) : (
          <span key={i}>{p.text}</span>
        ),
      )}
    </>
  );
}
