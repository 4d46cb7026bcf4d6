/**
 * The compare view's text, block by block as the reader sees it: headings as headings, steps
 * with their numbers, specs and calculators as on the page. Each change carries a word
 * ("Added", "Removed", "Changed") and a sign besides its colour, so it reads without colour too.
 */
import { Fragment, type ReactNode } from "react";
import type { BlockChange, Piece } from "~/lib/procedures/diff";
import type { ReaderBlock } from "~/lib/procedures/reader-blocks";

const LABEL = { add: "Added", del: "Removed", change: "Changed" } as const;

export function Ins({ children }: { children: ReactNode }) {
  return (
    <ins className="rounded-sm bg-ok-soft px-0.5 text-graphite underline decoration-ok decoration-2 underline-offset-[3px]">
      <span className="sr-only">[added: </span>
      {children}
      <span className="sr-only">]</span>
    </ins>
  );
}

export function Del({ children }: { children: ReactNode }) {
  return (
    <del className="rounded-sm bg-paper-deep px-0.5 text-graphite-soft line-through decoration-graphite decoration-2">
      <span className="sr-only">[removed: </span>
      {children}
      <span className="sr-only">]</span>
    </del>
  );
}

/** A whole value that changed: the old one struck through, the new one marked as added. */
export function BeforeAfter({ before, after }: { before: string; after: string }) {
  return (
    <>
      <Del>{before || "(empty)"}</Del> <span aria-hidden="true">→</span> <Ins>{after || "(empty)"}</Ins>
    </>
  );
}

function Pieces({ pieces }: { pieces: Piece[] }) {
  return (
    <>
      {pieces.map((p, k) => {
        const piece = p.op === "same" ? <span>{p.text}</span> : p.op === "add" ? <Ins>{p.text}</Ins> : <Del>{p.text}</Del>;
        // biome-ignore lint/suspicious/noArrayIndexKey: a diff's pieces have no identity but their place, and the list is never reordered
        return <Fragment key={k}>{piece}</Fragment>;
      })}
    </>
  );
}

/** One block drawn as on the page; `text` and `title` are the block's own words or their marked changes. */
function Block({ b, text, title }: { b: ReaderBlock; text: ReactNode; title: ReactNode }) {
  switch (b.kind) {
    case "heading": {
      const size = (b.level ?? 2) <= 2 ? "text-[1.35rem]" : b.level === 3 ? "text-[1.15rem]" : "text-base";
      return (
        <p className={`font-serif font-semibold leading-snug ${size}`} data-block="heading">
          {text}
        </p>
      );
    }
    case "item":
      return (
        <div className="flex gap-2" style={{ paddingLeft: `${(b.depth ?? 0) * 1.5}rem` }} data-block="item">
          <span className={`num w-7 shrink-0 text-right font-sans font-semibold ${b.marker === "•" ? "text-graphite-soft" : "text-brass"}`}>
            {b.marker ?? ""}
          </span>
          <span className="min-w-0 whitespace-pre-line">{text}</span>
        </div>
      );
    case "code":
      return <pre className="overflow-x-auto rounded-md bg-paper-deep px-3 py-2 font-mono text-sm">{text}</pre>;
    case "row":
      return (
        <p
          className={`num rounded border border-rule bg-card px-2 py-1 font-sans text-sm ${b.header ? "font-semibold" : ""}`}
          data-block="row"
        >
          {text}
        </p>
      );
    case "spec":
      return (
        <div className="spec-inline" data-block="spec">
          <span className="spec-tag">Spec</span>
          <span className="spec-label">{title}</span>
          <span className="num spec-value">{text}</span>
        </div>
      );
    case "calculator":
      return (
        <div className="rounded-lg border border-brass/50 bg-card font-sans text-sm" data-block="calculator">
          <p className="border-b border-brass/30 bg-brass-soft/40 px-3 py-1 text-xs font-semibold uppercase tracking-[0.12em] text-brass">
            {title}
          </p>
          <p className="num px-3 py-2">{text}</p>
        </div>
      );
    case "moment":
      return (
        <p className="font-sans text-sm" data-block="moment">
          <span className="mr-2 rounded bg-paper-deep px-1.5 py-0.5 text-xs font-semibold uppercase tracking-wide text-graphite-soft">
            {title}
          </span>
          <span className="num">{text}</span>
        </p>
      );
    default:
      return (
        <p className="whitespace-pre-line" data-block="paragraph">
          {text}
        </p>
      );
  }
}

function Wrap({ b, children }: { b: ReaderBlock; children: ReactNode }) {
  if (b.caution)
    return (
      <div className="rounded-md border border-brass border-l-[6px] bg-brass-soft px-3 py-1.5">
        <p className="caution-title">Caution</p>
        {children}
      </div>
    );
  if (b.quote) return <div className="border-l-[3px] border-rule pl-3 italic text-graphite-soft">{children}</div>;
  return <>{children}</>;
}

export function CompareBlocks({ changes }: { changes: BlockChange[] }) {
  return (
    <ol className="space-y-2 font-serif text-[1.0625rem] leading-relaxed" data-testid="text-diff">
      {changes.map((c, i) => {
        const b = c.block;
        const text = c.op === "change" ? <Pieces pieces={c.pieces} /> : b.text;
        const title = c.op === "change" && c.titlePieces ? <Pieces pieces={c.titlePieces} /> : b.title;
        const body = (
          <Wrap b={b}>
            <Block
              b={b}
              text={c.op === "add" ? <Ins>{text}</Ins> : c.op === "del" ? <Del>{text}</Del> : text}
              title={c.op === "add" ? <Ins>{title}</Ins> : c.op === "del" ? <Del>{title}</Del> : title}
            />
          </Wrap>
        );
        if (c.op === "same")
          return (
            // biome-ignore lint/suspicious/noArrayIndexKey: a diff's blocks have no identity but their place, and the list is never reordered
            <li key={i} className="grid grid-cols-[5.75rem_minmax(0,1fr)] gap-2 sm:gap-3" data-op="same">
              <span aria-hidden="true" />
              {body}
            </li>
          );
        const tone =
          c.op === "add" ? "border-ok text-ok" : c.op === "del" ? "border-graphite-soft text-graphite-soft" : "border-brass text-brass";
        return (
          // biome-ignore lint/suspicious/noArrayIndexKey: as above
          <li key={i} className="grid grid-cols-[5.75rem_minmax(0,1fr)] gap-2 sm:gap-3" data-op={c.op}>
            <span
              className={`whitespace-nowrap border-r-4 pr-2 pt-1 text-right font-sans text-xs font-semibold uppercase tracking-wide ${tone}`}
            >
              <span aria-hidden="true">{c.op === "add" ? "+ " : c.op === "del" ? "− " : "± "}</span>
              {LABEL[c.op]}
            </span>
            {body}
          </li>
        );
      })}
    </ol>
  );
}
