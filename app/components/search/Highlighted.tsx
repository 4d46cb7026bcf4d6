import { highlightPieces } from "~/lib/search/highlight";

export function Highlighted({ text }: { text: string }) {
  return (
    <>
      {highlightPieces(text).map((p, i) =>
        p.hit ? (
          <mark key={i} className="rounded-sm bg-brass-soft px-0.5 text-graphite">{p.text}</mark>
        ) : (
          <span key={i}>{p.text}</span>
        ),
      )}
    </>
  );
}
