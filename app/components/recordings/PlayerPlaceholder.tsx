import { formatTime } from "~/lib/time-format";
import { Poster } from "./Poster";

/**
 * What shows before the player has loaded, in the player's shape so nothing jumps: the poster, or,
 * when the page opens at a moment (?t=), no poster at all (the marked frame comes first).
 */
export function PlayerPlaceholder({
  recording: r,
  startAt,
}: {
  recording: { id: string; title: string; hasPoster: boolean };
  startAt: number | null;
}) {
  return (
    <div className="overflow-hidden rounded-[0.6rem] border border-rule bg-card" data-testid="player-placeholder">
      {startAt != null ? (
        <div className="flex aspect-video w-full items-center justify-center bg-graphite text-paper" role="status">
          Opening at <span className="num mx-1 font-mono">{formatTime(startAt)}</span>…
        </div>
      ) : (
        <Poster id={r.id} hasPoster={r.hasPoster} title={r.title} className="rounded-none" />
      )}
      <div className="h-[6.4rem] border-t border-rule min-[1025px]:h-[5.35rem]" />
    </div>
  );
}
