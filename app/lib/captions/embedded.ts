/**
 * A subtitle track inside the uploaded video (a phone writes mov_text into its MP4) read out as
 * WebVTT by ffmpeg. The caller gives the way ffmpeg is started (processing starts it so that it
 * dies with the worker, app/lib/recordings/processing.server.ts).
 */
export type RunFfmpeg = (args: string[]) => Promise<{ code: number | null; stdout: string; stderr: string }>;

/** The arguments: the first subtitle stream, converted by ffmpeg's WebVTT muxer, to stdout. */
function subtitleTrackArgs(src: string): string[] {
  return ["-v", "error", "-nostdin", "-i", src, "-map", "0:s:0", "-f", "webvtt", "-"];
}

/** The first subtitle track as WebVTT text, or null when ffmpeg finds none or cannot convert it (a picture-based track). */
export async function extractSubtitleTrack(src: string, runFfmpeg: RunFfmpeg): Promise<string | null> {
  const r = await runFfmpeg(subtitleTrackArgs(src));
  if (r.code !== 0 || !r.stdout.startsWith("WEBVTT")) return null;
  return r.stdout;
}
