import { parseSync, stringifySync } from "subtitle";
import webvtt, { type CueNode } from "webvtt-parser";
import { formatTime } from "../time-format";

/**
 * Caption files in and out: WebVTT read by the W3C's parser (webvtt-parser), SRT read by
 * `subtitle` and turned into WebVTT before the same checks, and both formats written from the
 * stored cues. Pure: no database, no files.
 */

/** One caption: seconds from the start of the recording, and its words as plain text. */
export type CaptionCue = { start: number; end: number; text: string };

export type CaptionFormat = "vtt" | "srt";

/** What is wrong with a file: the cue it is about (from 1) or null for the whole file. */
export type CaptionProblem = { cue: number | null; message: string };

export type CaptionRead = { ok: true; format: CaptionFormat; cues: CaptionCue[] } | { ok: false; problems: CaptionProblem[] };

/** Sane sizes: a long bench video has a few thousand lines, each a sentence or two. */
export const CAPTION_LIMITS = { fileBytes: 1_000_000, cues: 5_000, cueChars: 500, problemsListed: 20 } as const;

/** A cue may end this much after the video's last frame (files round their last time up). */
const END_SLACK_S = 1;

/** The tags caption files carry for styling; their words are kept, the tags dropped. */
const STYLING_TAGS = new Set(["c", "i", "b", "u", "ruby", "rt", "v", "lang"]);

const Parser = webvtt.WebVTTParser;

/** The character references WebVTT defines for cue text, with their semicolons (the parser's own list lacks them). */
const ENTITIES: Record<string, string> = {
  "&amp;": "&",
  "&lt;": "<",
  "&gt;": ">",
  "&lrm;": "\u200e",
  "&rlm;": "\u200f",
  "&nbsp;": "\u00a0",
};

/** A file's text as the parsers want it: no byte order mark, LF line ends. */
function normalised(text: string): string {
  return text.replace(/^\uFEFF/, "").replace(/\r\n?/g, "\n");
}

/** Which format a file is in: a WebVTT file says so in its first line; otherwise SRT by name or by its first time line. */
export function captionFormatOf(fileName: string, text: string): CaptionFormat | null {
  const body = normalised(text);
  if (/^WEBVTT(?:[ \t].*)?(?:\n|$)/.test(body)) return "vtt";
  if (/\.srt$/i.test(fileName) || /^\s*\d+\n\d{1,2}:\d{2}:\d{2}[,.]\d{1,3} --> /.test(body)) return "srt";
  return null;
}

/**
 * SRT's common styling (`<font color>`, and `{\an8}`-style placement codes that some programs
 * write) has no WebVTT counterpart: dropped before conversion, the words kept.
 */
function srtStylingDropped(text: string): string {
  return text.replace(/<\/?font\b[^>]*>/gi, "").replace(/\{\\[^}]*\}/g, "");
}

/** An SRT file as WebVTT text, through `subtitle`'s parser and writer; a malformed file throws with its row. */
export function srtToWebVtt(text: string): string {
  const nodes = parseSync(normalised(text)).map((n) =>
    n.type === "cue" ? { ...n, data: { ...n.data, text: srtStylingDropped(n.data.text), settings: undefined } } : n,
  );
  return stringifySync(nodes, { format: "WebVTT" });
}

/** A cue's words without its styling: the text of its tree, tags and inline timestamps dropped. */
function plainText(nodes: CueNode[]): string {
  return nodes.map((n) => (n.type === "text" ? n.value : n.type === "object" ? plainText(n.children) : "")).join("");
}

/** The tags in a cue's source that are not WebVTT styling (an HTML `<script>`, `<a href>`…). */
function foreignTags(source: string): string[] {
  const names = [...source.matchAll(/<\/?([A-Za-z][\w-]*)/g)].map((m) => m[1].toLowerCase());
  return [...new Set(names.filter((n) => !STYLING_TAGS.has(n)))];
}

/** The number of the cue whose timing line is at or before `line` (1-based lines of `body`). */
function cueAtLine(body: string, line: number): number | null {
  const lines = body.split("\n");
  let cue = 0;
  for (let i = 0; i < Math.min(line, lines.length); i++) if (lines[i].includes("-->")) cue++;
  return cue || null;
}

/**
 * Reads a caption file and checks it: a known format, every cue's timing within the recording
 * (`durationS`, when known), sane sizes, plain text only. The cues come back in the file's
 * order; overlapping cues are kept (WebVTT allows two people speaking at once).
 */
export function readCaptions(fileName: string, text: string, durationS: number | null): CaptionRead {
  if (new TextEncoder().encode(text).length > CAPTION_LIMITS.fileBytes) {
    return { ok: false, problems: [{ cue: null, message: `The file is larger than ${CAPTION_LIMITS.fileBytes / 1_000_000} MB.` }] };
  }
  const format = captionFormatOf(fileName, text);
  if (!format) {
    return {
      ok: false,
      problems: [
        { cue: null, message: "This is not a caption file: a WebVTT file begins with WEBVTT, an SRT file with a number and a time line." },
      ],
    };
  }
  let vtt: string;
  try {
    vtt = format === "srt" ? srtToWebVtt(text) : normalised(text);
  } catch (err) {
    const m = /expected timestamp at row (\d+), but received: "(.*)"$/.exec(err instanceof Error ? err.message : "");
    const message = m
      ? `Line ${m[1]}: expected a time line such as 00:00:01,000 --> 00:00:04,000, found "${m[2].slice(0, 60)}".`
      : "The SRT file could not be read.";
    return { ok: false, problems: [{ cue: null, message }] };
  }
  const parsed = new Parser(ENTITIES).parse(vtt);
  const problems: CaptionProblem[] = parsed.errors.map((e) => {
    const cue = cueAtLine(vtt, e.line);
    return { cue, message: format === "vtt" ? `Line ${e.line}: ${e.message}` : e.message };
  });
  if (parsed.cues.length > CAPTION_LIMITS.cues) {
    problems.push({ cue: null, message: `The file holds ${parsed.cues.length} cues; at most ${CAPTION_LIMITS.cues} are taken.` });
  }
  const cues: CaptionCue[] = [];
  parsed.cues.forEach((c, i) => {
    const n = i + 1;
    const foreign = foreignTags(c.text);
    if (foreign.length) problems.push({ cue: n, message: `Holds markup that is not caption text (<${foreign.join(">, <")}>).` });
    const words = plainText(c.tree.children)
      .split("\n")
      .map((l) => l.replace(/\s+/g, " ").trim())
      .filter(Boolean)
      .join("\n");
    if (!words) problems.push({ cue: n, message: "Has no words." });
    if (words.length > CAPTION_LIMITS.cueChars) problems.push({ cue: n, message: `Is longer than ${CAPTION_LIMITS.cueChars} characters.` });
    if (durationS != null && c.endTime > durationS + END_SLACK_S) {
      problems.push({ cue: n, message: `Ends at ${formatTime(c.endTime)}, after the recording's end (${formatTime(durationS)}).` });
    }
    cues.push({ start: c.startTime, end: c.endTime, text: words });
  });
  if (!parsed.cues.length && !problems.length) problems.push({ cue: null, message: "The file holds no captions." });
  if (problems.length) return { ok: false, problems: problems.slice(0, CAPTION_LIMITS.problemsListed) };
  return { ok: true, format, cues };
}

/** The problems in words, one sentence each ("Cue 3: Has no words."). */
export function problemLines(problems: CaptionProblem[]): string[] {
  return problems.map((p) => (p.cue == null ? p.message : `Cue ${p.cue}: ${p.message}`));
}

const ms = (s: number) => Math.round(s * 1000);

/** WebVTT's three escapes (the W3C specification, "cue text"): what a corrected line says stays text. */
function vttEscaped(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}

/** Cues as a WebVTT file (what the player loads and the export gives). */
export function toWebVtt(cues: CaptionCue[]): string {
  return stringifySync(
    cues.map((c) => ({ type: "cue" as const, data: { start: ms(c.start), end: ms(c.end), text: vttEscaped(c.text) } })),
    { format: "WebVTT" },
  );
}

/** Cues as an SRT file. */
export function toSrt(cues: CaptionCue[]): string {
  return stringifySync(
    cues.map((c) => ({ type: "cue" as const, data: { start: ms(c.start), end: ms(c.end), text: c.text } })),
    { format: "SRT" },
  );
}
