// The W3C's WebVTT parser ships no types; these are the parts app/lib/captions/format.ts reads.
declare module "webvtt-parser" {
  export type CueNode =
    | { type: "text"; value: string }
    | { type: "timestamp"; value: number }
    | { type: "object"; name: string; classes: string[]; value?: string; children: CueNode[] };
  export type ParsedCue = { id: string; startTime: number; endTime: number; text: string; tree: { children: CueNode[] } };
  export type ParseError = { message: string; line: number; col?: number };
  export class WebVTTParser {
    constructor(entities?: Record<string, string>);
    parse(input: string, mode?: "subtitles" | "chapters" | "metadata"): { cues: ParsedCue[]; errors: ParseError[] };
  }
  const pkg: { WebVTTParser: typeof WebVTTParser };
  export default pkg;
}
