import { useEffect, useRef, useState } from "react";
import { createPortal } from "react-dom";
import type { Widget } from "~/lib/procedures/body";
import { CalculatorWidget } from "./CalculatorWidget";

/**
 * The server-rendered body of a procedure. React leaves the HTML alone; after hydration each
 * calculator placeholder gets its interactive widget through a portal (the only parts that hydrate).
 */
export function ProcedureBody({ html, widgets, units }: { html: string; widgets: Widget[]; units?: Record<string, string> }) {
  const ref = useRef<HTMLDivElement>(null);
  const [targets, setTargets] = useState<HTMLElement[]>([]);
  // New HTML means new placeholders, which the effect finds through the ref.
  useEffect(() => {
    const els = Array.from(ref.current?.querySelectorAll<HTMLElement>("[data-widget='calculator']") ?? []);
    for (const el of els) el.replaceChildren();
    setTargets(els);
  }, [html]);
  return (
    <>
      {/* biome-ignore lint/security/noDangerouslySetInnerHtml: the body was sanitized at save (document.ts) and rendered by our own components on the server */}
      <div ref={ref} className="proc-body prose-proc" data-testid="procedure-body" dangerouslySetInnerHTML={{ __html: html }} />
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
