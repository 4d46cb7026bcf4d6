import { highlightPieces } from "~/lib/search/highlight";

export function Highlighted({ text }: { text: string }) {
  // Each piece is keyed by where it starts in the text.
  let at = 0;
  const pieces = highlightPieces(text).map((p) => {
    const start = at;
    at += p.text.length;
    return { ...p, start };
  });
  return (
    <>
      {pieces.map((p) =>
        p.hit ? (
          <mark key={p.start} className="-mx-px rounded-sm bg-brass-soft px-px text-graphite">
            {p.text}
          </mark>
        ) : (
          <span key={p.start}>{p.text}</span>
        ),
      )}
    </>
  );
}
