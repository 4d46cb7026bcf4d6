import { describe, expect, it } from "vitest";
import { captionFormatOf, problemLines, readCaptions, srtToWebVtt, toSrt, toWebVtt } from "./format";

// Example files are written to the published formats. WebVTT: the W3C's "WebVTT: The Web Video
// Text Tracks Format" (Candidate Recommendation), its examples in §2 (cue identifiers, <v> voice
// spans, NOTE comments, cue settings, <b>/<i>/<c.class> styling, &amp; escapes). SRT: its common
// form (a counter, "hh:mm:ss,mmm --> hh:mm:ss,mmm", the text, a blank line), as SubRip writes it;
// no formal specification exists.

const OK = (r: ReturnType<typeof readCaptions>) => {
  if (!r.ok) throw new Error(problemLines(r.problems).join("\n"));
  return r;
};

describe("reading WebVTT", () => {
  it("reads the specification's example with identifiers, voices, a NOTE and settings, as plain text", () => {
    // W3C WebVTT §2.1/§2.2 examples: a cue identifier, <v> voice spans, a NOTE block, cue settings.
    const file = [
      "WEBVTT",
      "",
      "NOTE This file was written by hand.",
      "",
      "intro",
      "00:00:01.000 --> 00:00:04.000 line:0 position:20% align:start",
      "<v Builder>Lube on the threads, <i>not</i> the washer face.",
      "",
      "00:00:04.500 --> 00:00:07.250",
      "<v.loud Builder>Three passes &amp; a final.</v>",
      "<c.note>Watch the gauge.</c>",
      "",
    ].join("\n");
    const r = OK(readCaptions("talk.vtt", file, 10));
    expect(r.format).toBe("vtt");
    expect(r.cues).toEqual([
      { start: 1, end: 4, text: "Lube on the threads, not the washer face." },
      { start: 4.5, end: 7.25, text: "Three passes & a final.\nWatch the gauge." },
    ]);
  });

  it("takes a byte order mark and CRLF line ends (W3C WebVTT §4.1: an optional U+FEFF, any of CRLF, LF, CR)", () => {
    const file = "\uFEFFWEBVTT\r\n\r\n00:01.000 --> 00:02.500\r\nFirst line\r\n\r\n00:03.000 --> 00:04.000\r\nSecond line\r\n";
    expect(OK(readCaptions("a.vtt", file, 5)).cues).toEqual([
      { start: 1, end: 2.5, text: "First line" },
      { start: 3, end: 4, text: "Second line" },
    ]);
  });

  it("keeps overlapping cues in the file's order (WebVTT allows cues that overlap in time)", () => {
    const file = "WEBVTT\n\n00:00:01.000 --> 00:00:05.000\nOne speaks\n\n00:00:03.000 --> 00:00:06.000\nThe other answers\n";
    const r = OK(readCaptions("a.vtt", file, 10));
    expect(r.cues.map((c) => [c.start, c.end])).toEqual([
      [1, 5],
      [3, 6],
    ]);
  });

  it("refuses a cue that ends before it starts, naming the cue and line (W3C WebVTT §6.3: end must be greater than start)", () => {
    const file = "WEBVTT\n\n00:00:01.000 --> 00:00:02.000\nFine\n\n00:00:05.000 --> 00:00:04.000\nBackwards\n";
    const r = readCaptions("a.vtt", file, 10);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems[0].cue).toBe(2);
    expect(problemLines(r.problems)[0]).toMatch(/^Cue 2: Line 6: .*greater than start/);
  });

  it("refuses a malformed time (W3C WebVTT §4.2: mm:ss.ttt needs three decimals)", () => {
    const r = readCaptions("a.vtt", "WEBVTT\n\n00:01.5 --> 00:02.000\nToo short a time\n", 10);
    expect(r.ok).toBe(false);
  });

  it("refuses cues past the recording's end, with both times in words", () => {
    const r = readCaptions("a.vtt", "WEBVTT\n\n00:00:08.000 --> 00:00:14.000\nLate\n", 10);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(problemLines(r.problems)).toEqual(["Cue 1: Ends at 0:14.0, after the recording's end (0:10.0)."]);
  });

  it("refuses markup that is not WebVTT styling (an HTML script tag is not caption text)", () => {
    const r = readCaptions("a.vtt", "WEBVTT\n\n00:00:01.000 --> 00:00:02.000\nHello <script>alert(1)</script>\n", 10);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.some((p) => p.cue === 1 && p.message.includes("<script>"))).toBe(true);
  });

  it("refuses a file that is neither format, and one with no cues", () => {
    expect(readCaptions("notes.txt", "just some words", 10)).toMatchObject({ ok: false });
    const empty = readCaptions("a.vtt", "WEBVTT\n\n", 10);
    expect(empty.ok || problemLines(empty.problems)).toEqual(["The file holds no captions."]);
  });
});

describe("reading SRT", () => {
  // SRT's common form: counter, time line with a comma before the milliseconds, text, blank line.
  const srt = [
    "1",
    "00:00:01,000 --> 00:00:03,500",
    "Torque the studs",
    "in three passes.",
    "",
    "2",
    "00:00:04,000 --> 00:00:06,000",
    "<i>Molly</i> on the threads.",
    "",
  ].join("\r\n");

  it("converts to WebVTT (full stop before the milliseconds, the WEBVTT line first)", () => {
    const vtt = srtToWebVtt(srt);
    expect(vtt.startsWith("WEBVTT\n\n")).toBe(true);
    expect(vtt).toContain("00:00:01.000 --> 00:00:03.500");
  });

  it("reads cues with styling dropped and lines kept", () => {
    const r = OK(readCaptions("talk.srt", srt, 10));
    expect(r.format).toBe("srt");
    expect(r.cues).toEqual([
      { start: 1, end: 3.5, text: "Torque the studs\nin three passes." },
      { start: 4, end: 6, text: "Molly on the threads." },
    ]);
  });

  it("drops SRT's <font> tags and {\\an8} placement codes, keeping their words", () => {
    const r = OK(readCaptions("a.srt", '\uFEFF1\n00:00:01,000 --> 00:00:02,000\n{\\an8}<font color="#ffff00">Top line</font>\n', 10));
    expect(r.cues[0].text).toBe("Top line");
  });

  it("names the line of a broken time line", () => {
    const r = readCaptions("a.srt", "1\n00:00:01,000 -> 00:00:02,000\nNo arrow\n", 10);
    expect(r.ok || problemLines(r.problems)[0]).toMatch(/^Line 2: expected a time line/);
  });

  it("is told apart from WebVTT by its content when the name says nothing", () => {
    expect(captionFormatOf("upload", "1\n00:00:01,000 --> 00:00:02,000\nx\n")).toBe("srt");
    expect(captionFormatOf("x.srt", "WEBVTT\n")).toBe("vtt");
  });
});

describe("writing", () => {
  const cues = [
    { start: 1, end: 4.25, text: "Moly on the threads & under the nut." },
    { start: 62.5, end: 65, text: "Second <pass>\nto 60 N·m." },
  ];

  it("writes WebVTT that the W3C parser reads back to the same cues (escaped &, <, >)", () => {
    const vtt = toWebVtt(cues);
    expect(vtt).toContain("00:01:02.500 --> 00:01:05.000");
    expect(vtt).toContain("&amp; under");
    expect(vtt).toContain("&lt;pass&gt;");
    expect(OK(readCaptions("x.vtt", vtt, 70)).cues).toEqual(cues);
  });

  it("writes SRT in its common form (counter, comma before milliseconds)", () => {
    const srt = toSrt(cues);
    expect(srt.split("\n").slice(0, 3)).toEqual(["1", "00:00:01,000 --> 00:00:04,250", "Moly on the threads & under the nut."]);
    expect(srt).toContain("\n2\n00:01:02,500 --> 00:01:05,000\n");
  });
});
