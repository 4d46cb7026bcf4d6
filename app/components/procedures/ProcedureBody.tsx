import { createContext, useContext, useEffect, useRef, useState } from "react";
import { createPortal } from "react-dom";
import type { Widget } from "~/lib/procedures/body";
import { CalculatorWidget } from "./CalculatorWidget";

/**
 * On the server, the body HTML of a page request whose loader data leaves it out
 * (app/lib/procedures/page-body.server.ts); provided by app/entry.server.tsx.
 */
export const PageBodyHtml = createContext<string | null>(null);

/**
 * The server-rendered body of a procedure. React leaves the HTML alone; after hydration each
 * calculator placeholder gets its interactive widget through a portal (the only parts that hydrate).
 */
export function ProcedureBody({ html, widgets, units }: { html: string | null; widgets: Widget[]; units?: Record<string, string> }) {
  // html null: on the server the render was handed the body apart; in the browser the page holds
  // it, and hydration leaves a dangerouslySetInnerHTML element's content as the server wrote it
  // (React does not compare it), so "" keeps the page's body until a navigation brings new HTML.
  const handedApart = useContext(PageBodyHtml);
  const markup = html ?? handedApart ?? "";
  const ref = useRef<HTMLDivElement>(null);
  const [targets, setTargets] = useState<HTMLElement[]>([]);
  // New HTML means new placeholders, which the effect finds through the ref.
  useEffect(() => {
    const els = Array.from(ref.current?.querySelectorAll<HTMLElement>("[data-widget='calculator']") ?? []);
    for (const el of els) el.replaceChildren();
    setTargets(els);
  }, [markup]);
  return (
    <>
      <div
        ref={ref}
        className="proc-body prose-proc"
        data-testid="procedure-body"
        // biome-ignore lint/security/noDangerouslySetInnerHtml: the body was sanitized at save (document.ts) and rendered by our own components on the server
        dangerouslySetInnerHTML={{ __html: markup }}
        suppressHydrationWarning
      />
      {targets.map((el, i) => {
        const w = widgets[Number(el.dataset.widgetIndex ?? i)];
        return w
          ? createPortal(
              <CalculatorWidget
                kind={w.attrs.kind}
                title={w.attrs.title}
                preset={w.attrs.preset}
                outcome={w.outcome}
                units={units}
                interactive
                index={i}
              />,
              el,
              `w${i}`,
            )
          : null;
      })}
    </>
  );
}
