import { useEffect, useState, type RefObject } from "react";
import type { MarksPanelHandle } from "./MarksPanel";
import type { PlayerApi } from "./Player.client";

function isTyping(el: EventTarget | null) {
  const e = el as HTMLElement | null;
  if (!e) return false;
  // The player's position and volume bars are inputs too, but nobody types in them: the page's
  // keys (arrows ±5 s, frames) work there as everywhere else.
  if (e.tagName === "INPUT" && (e as HTMLInputElement).type === "range") return false;
  return e.isContentEditable || ["INPUT", "TEXTAREA", "SELECT"].includes(e.tagName);
}

/** Space on a focused button, link or disclosure presses it, as everywhere else; it does not play. */
function pressesSomething(el: EventTarget | null) {
  const e = el as HTMLElement | null;
  return Boolean(e?.closest?.("button, a[href], summary, [role=button]"));
}

/**
 * The watch page's keys, anywhere on the page but in a text field: Space plays or pauses, ← →
 * move 5 s, , and . one frame; for those who may mark, M marks the moment and S … S a span.
 * Listened for in the capture phase, so the player's own controls do not take them first.
 * Returns where a span being marked started (null when none is open).
 */
export function useWatchKeys({
  enabled,
  player,
  marksPanel,
  fps,
  canMark,
}: {
  enabled: boolean;
  player: RefObject<PlayerApi | null>;
  marksPanel: RefObject<MarksPanelHandle | null>;
  fps: number;
  canMark: boolean;
}): number | null {
  const [spanStart, setSpanStart] = useState<number | null>(null);

  useEffect(() => {
    if (!enabled) return;
    const onKey = (e: KeyboardEvent) => {
      if (isTyping(e.target) || e.ctrlKey || e.metaKey || e.altKey) return;
      const p = player.current;
      if (!p) return;
      let handled = true;
      switch (e.key) {
        case " ":
          if (pressesSomething(e.target)) return;
          p.togglePlay();
          break;
        case "ArrowLeft":
          p.seek(p.currentTime() - 5);
          break;
        case "ArrowRight":
          p.seek(Math.min(p.duration() || Infinity, p.currentTime() + 5));
          break;
        case ",":
          p.step(-1, fps);
          break;
        case ".":
          p.step(1, fps);
          break;
        case "m":
        case "M":
          if (!canMark) return;
          marksPanel.current?.openNew(Number(p.currentTime().toFixed(2)));
          break;
        case "s":
        case "S":
          if (!canMark) return;
          if (spanStart == null) setSpanStart(Number(p.currentTime().toFixed(2)));
          else {
            const end = Number(p.currentTime().toFixed(2));
            const [a, b] = end > spanStart ? [spanStart, end] : [end, spanStart];
            setSpanStart(null);
            if (b - a < 0.05) return;
            marksPanel.current?.openNew(a, b);
          }
          break;
        default:
          handled = false;
      }
      if (handled) {
        e.preventDefault();
        e.stopPropagation();
      }
    };
    window.addEventListener("keydown", onKey, true);
    return () => window.removeEventListener("keydown", onKey, true);
  }, [enabled, player, marksPanel, fps, canMark, spanStart]);

  return spanStart;
}

/** The keys above, as help under the player; shown only where a keyboard is likely (a fine pointer that hovers). */
export function WatchKeyHelp({ canMark }: { canMark: boolean }) {
  const k = "rounded border border-rule bg-card px-1 font-mono text-[11px] text-graphite";
  return (
    <p className="keyboard-only flex flex-wrap gap-x-3 gap-y-1 text-xs text-graphite-soft" data-testid="key-help">
      <span className="sr-only">Keyboard:</span>
      <span>
        <kbd className={k}>Space</kbd> play / pause
      </span>
      <span>
        <kbd className={k}>←</kbd> <kbd className={k}>→</kbd> 5 s
      </span>
      <span>
        <kbd className={k}>,</kbd> <kbd className={k}>.</kbd> one frame
      </span>
      {canMark && (
        <span>
          <kbd className={k}>M</kbd> mark here
        </span>
      )}
      {canMark && (
        <span>
          <kbd className={k}>S</kbd> … <kbd className={k}>S</kbd> mark a span
        </span>
      )}
    </p>
  );
}
