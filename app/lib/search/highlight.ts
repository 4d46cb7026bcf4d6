/** Markers around highlighted words (private-use characters); never HTML. */
export const HL_PRE = "\uE000";
export const HL_POST = "\uE001";

export const KIND_LABELS: Record<string, string> = {
  procedure: "Procedures",
  spec: "Specs",
  mark: "Marks in recordings",
  reading: "Readings",
  recording: "Recordings",
  build: "Builds",
  test_record: "Test records",
  caption: "Said in recordings",
};

export const STATE_LABELS: Record<string, string> = { published: "Published", draft: "Draft", in_review: "In review" };

/** Splits highlighted text into plain and marked pieces. */
export function highlightPieces(text: string): { text: string; hit: boolean }[] {
  const out: { text: string; hit: boolean }[] = [];
  let rest = text;
  while (rest.length) {
    const a = rest.indexOf(HL_PRE);
    if (a < 0) {
      out.push({ text: rest, hit: false });
      break;
    }
    if (a > 0) out.push({ text: rest.slice(0, a), hit: false });
    const b = rest.indexOf(HL_POST, a + 1);
    const end = b < 0 ? rest.length : b;
    out.push({ text: rest.slice(a + 1, end), hit: true });
    rest = b < 0 ? "" : rest.slice(b + 1);
  }
  return out.filter((p) => p.text.length);
}

export function clock(t: number): string {
  const m = Math.floor(t / 60);
  const s = t - m * 60;
  return `${m}:${s.toFixed(s % 1 ? 1 : 0).padStart(s % 1 ? 4 : 2, "0")}`;
}

/**
 * Whether a hit's address ends in a text fragment (`#:~:text=`, a procedure block's words). The
 * browser scrolls to and marks that text only when it loads the page itself, so such a hit is
 * opened as a full page load, not a navigation inside the app.
 */
export function opensAtText(url: string): boolean {
  return url.includes("#:~:text=");
}
