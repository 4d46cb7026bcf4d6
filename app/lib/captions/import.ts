/**
 * Where captions come from, as one small interface (docs/decisions/012-captions-import.md):
 * anything that can give a caption file's text under a name can be imported by
 * `importCaptions` (captions.server.ts), which checks it the same way whatever its origin.
 * Today: a file someone attached, or a subtitle track found inside the video during processing.
 * A speech-to-text service would be one more kind whose `text()` returns the WebVTT it wrote.
 */
export type CaptionSource = {
  kind: "file" | "embedded";
  /** The file's name, or the track's description; an SRT file is told apart by ".srt" or its content. */
  name: string;
  /** The file's text (WebVTT or SRT). */
  text: () => Promise<string>;
};
