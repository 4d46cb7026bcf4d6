/**
 * The read view of a stored document: TipTap's JSON static renderer mapped to our own
 * components. No ProseMirror, no editor. Used on the server only (./render.server.tsx).
 */
import type { ReactNode } from "react";
import { renderJSONContentToReactElement } from "@tiptap/static-renderer/json/react";
import { unitLabel, type UnitCode } from "~/lib/calc";
import { formatSeconds, safeHref, type CalculatorAttrs, type JSONNode, type MomentAttrs, type SpecAttrs } from "~/lib/procedures/document";
import { numericLeaves, runCalculator } from "~/lib/procedures/calc-presets";
import { CalculatorWidget } from "./CalculatorWidget";

export type RenderContext = {
  procedures: Map<string, { title: string; slug: string }>;
  recordings: Map<string, string>;
};

type P = { node: JSONNode; children?: ReactNode };

export const ul = (u: string) => {
  try {
    return unitLabel(u as UnitCode);
  } catch {
    return u;
  }
};

export function specLimits(a: Pick<SpecAttrs, "nominal" | "min" | "max" | "unit">): string {
  const u = ul(a.unit);
  const parts: string[] = [];
  if (a.nominal != null) parts.push(`${a.nominal} ${u}`);
  if (a.min != null && a.max != null) parts.push(`${a.nominal != null ? "(" : ""}${a.min}–${a.max} ${u}${a.nominal != null ? ")" : ""}`);
  else if (a.min != null) parts.push(`min ${a.min} ${u}`);
  else if (a.max != null) parts.push(`max ${a.max} ${u}`);
  return parts.join(" ");
}

function unitLabels(preset: unknown): Record<string, string> {
  return Object.fromEntries(numericLeaves(preset).flatMap((l) => (l.unit ? [[l.unit, ul(l.unit)]] : [])));
}

export function renderDoc(doc: JSONNode, ctx: RenderContext) {
  let calcIndex = 0;
  const nodeMapping: Record<string, (p: P) => ReactNode> = {
    doc: ({ children }: P) => <>{children}</>,
    paragraph: ({ children }: P) => <p>{children}</p>,
    heading: ({ node, children }: P) => {
      const level = Math.min(4, Math.max(1, Number(node.attrs?.level ?? 2)));
      const Tag = (["h2", "h2", "h3", "h4"] as const)[level - 1];
      return <Tag>{children}</Tag>;
    },
    text: ({ node }: P) => <>{node.text}</>,
    hardBreak: () => <br />,
    horizontalRule: () => <hr />,
    bulletList: ({ children }: P) => <ul>{children}</ul>,
    orderedList: ({ node, children }: P) => <ol start={Number(node.attrs?.start ?? 1)}>{children}</ol>,
    listItem: ({ children }: P) => <li>{children}</li>,
    blockquote: ({ children }: P) => <blockquote>{children}</blockquote>,
    codeBlock: ({ children }: P) => (
      <pre>
        <code>{children}</code>
      </pre>
    ),
    table: ({ children }: P) => (
      <div className="table-wrap">
        <table>
          <tbody>{children}</tbody>
        </table>
      </div>
    ),
    tableRow: ({ children }: P) => <tr>{children}</tr>,
    tableHeader: ({ node, children }: P) => (
      <th colSpan={Number(node.attrs?.colspan ?? 1)} rowSpan={Number(node.attrs?.rowspan ?? 1)}>
        {children}
      </th>
    ),
    tableCell: ({ node, children }: P) => (
      <td colSpan={Number(node.attrs?.colspan ?? 1)} rowSpan={Number(node.attrs?.rowspan ?? 1)}>
        {children}
      </td>
    ),
    caution: ({ children }: P) => (
      <aside className="caution" role="note" aria-label="Caution">
        <p className="caution-title">Caution</p>
        {children}
      </aside>
    ),
    procedureLink: ({ node }: P) => {
      const target = ctx.procedures.get(String(node.attrs?.procedureId));
      return target ? (
        <a className="proc-link" href={`/procedures/${target.slug}`}>
          {target.title}
        </a>
      ) : (
        <span className="proc-link-missing">(linked procedure no longer exists)</span>
      );
    },
    spec: ({ node }: P) => {
      const a = node.attrs as SpecAttrs;
      return (
        // `spec-<key>`: where a search hit for this spec lands (app/components/search/LandingTarget.tsx).
        <div className="spec-inline" data-spec-key={a.id} id={a.id ? `spec-${a.id}` : undefined}>
          <span className="spec-tag">Spec</span>
          <span className="spec-label">{a.label}</span>
          <span className="num spec-value">{specLimits(a)}</span>
          {a.note ? <span className="spec-note">{a.note}</span> : null}
        </div>
      );
    },
    calculator: ({ node }: P) => {
      const a = node.attrs as CalculatorAttrs;
      const i = calcIndex++;
      return (
        <div data-widget="calculator" data-widget-index={i}>
          <CalculatorWidget
            kind={a.kind}
            title={a.title}
            preset={a.preset}
            outcome={runCalculator(a.kind, a.preset)}
            units={unitLabels(a.preset)}
            index={i}
          />
        </div>
      );
    },
    videoMoment: ({ node }: P) => {
      const a = node.attrs as MomentAttrs;
      const title = ctx.recordings.get(a.recordingId);
      const t = `${formatSeconds(a.start)}${a.end != null ? `–${formatSeconds(a.end)}` : ""}`;
      return (
        <figure className="moment">
          {/* biome-ignore lint/a11y/useMediaCaption: shop recordings carry no caption track; the figure's caption says what the moment shows */}
          <video
            controls
            preload="none"
            src={`/api/recordings/${a.recordingId}/media#t=${a.start}${a.end != null ? `,${a.end}` : ""}`}
            poster={`/api/recordings/${a.recordingId}/poster`}
          />
          <figcaption>
            <span className="num moment-time">{t}</span> {a.caption}
            {" · "}
            <a href={`/recordings/${a.recordingId}?t=${Math.floor(a.start)}`}>
              {title ? `Open “${title}” at ${formatSeconds(a.start)}` : `Open the recording at ${formatSeconds(a.start)}`}
            </a>
          </figcaption>
        </figure>
      );
    },
  };
  type MP = { mark: { attrs?: Record<string, unknown> }; children?: ReactNode };
  const markMapping: Record<string, (p: MP) => ReactNode> = {
    bold: ({ children }: { children?: ReactNode }) => <strong>{children}</strong>,
    italic: ({ children }: { children?: ReactNode }) => <em>{children}</em>,
    strike: ({ children }: { children?: ReactNode }) => <s>{children}</s>,
    underline: ({ children }: { children?: ReactNode }) => <u>{children}</u>,
    code: ({ children }: { children?: ReactNode }) => <code>{children}</code>,
    link: ({ mark, children }: { mark: { attrs?: Record<string, unknown> }; children?: ReactNode }) => {
      const href = safeHref(mark.attrs?.href);
      if (!href) return <>{children}</>;
      const external = /^https?:/i.test(href);
      return (
        <a href={href} {...(external ? { rel: "noopener noreferrer nofollow", target: "_blank" } : {})}>
          {children}
        </a>
      );
    },
  };
  const render = renderJSONContentToReactElement({
    nodeMapping: nodeMapping as never,
    markMapping: markMapping as never,
    unhandledNode: (() => null) as never,
    unhandledMark: (({ children }: { children?: ReactNode }) => <>{children}</>) as never,
  });
  return render({ content: doc as never });
}
