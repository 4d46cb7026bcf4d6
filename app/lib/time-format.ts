/**
 * How a length of time in seconds reads on a screen, the one place for it: a moment in a video
 * to the tenth (`formatTime`), a video's length to the second (`formatDuration`), and a moment
 * cited in a procedure, whole seconds counted down (`formatSeconds`). Pure, safe in the browser.
 */

/** h:mm:ss with the hours only when there are any: 83 → "1:23", 3725 → "1:02:05". */
function clock(wholeSeconds: number): string {
  const h = Math.floor(wholeSeconds / 3600);
  const m = Math.floor((wholeSeconds % 3600) / 60);
  const sec = String(wholeSeconds % 60).padStart(2, "0");
  return h ? `${h}:${String(m).padStart(2, "0")}:${sec}` : `${m}:${sec}`;
}

/** 83.5 → "1:23.5"; 3725 → "1:02:05.0"; nothing → "–". */
export function formatTime(s: number | null | undefined): string {
  if (s == null || !Number.isFinite(s)) return "–";
  const neg = s < 0;
  const a = Math.abs(s);
  const h = Math.floor(a / 3600);
  const m = Math.floor((a % 3600) / 60);
  const ss = (a % 60).toFixed(1).padStart(4, "0");
  return `${neg ? "-" : ""}${h ? `${h}:${String(m).padStart(2, "0")}` : m}:${ss}`;
}

/** A video's length to the nearest second: 83.5 → "1:24"; nothing → "–". */
export function formatDuration(s: number | null | undefined): string {
  if (s == null || !Number.isFinite(s)) return "–";
  return clock(Math.round(s));
}

/**
 * A moment cited in a procedure, the seconds begun not counted (a link to 83.9 s opens at 1:23,
 * as the player's `?t=` does); below zero reads as the start.
 */
export function formatSeconds(s: number): string {
  return clock(Math.max(0, Math.floor(s)));
}
