// What is said in two demo recordings of the invented Larkspur Engine Works (issue 17): the head
// stud clamp-load test gets captions as if attached from a file, with one correction kept in its
// history ("molly" heard for "moly"); a second clip, a bore check, carries its captions as a
// subtitle track inside the video (mov_text), which the worker reads out while processing it.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { captionCues, captionEdits, captionSources, recordings } from "../../app/db/schema";
import { DEMO_ID } from "./recordings";

export const BORE_CLIP_ID = "5eed0000-0000-4000-8000-0000000b04e1";

type Db = NodePgDatabase<Record<string, unknown>>;

/** Marcus talking through the stud test (times in seconds, inside its 24 s). */
const STUD_TALK: [number, number, string][] = [
  [0.5, 3.2, "Right, studs one to four on the load cell fixture."],
  [3.4, 6.0, "Threads chased and blown out, molly on the threads and under the nut."],
  [6.2, 9.5, "First pass to forty newton metres, centre out."],
  [9.8, 12.6, "Tomás, read me the cell on four."],
  [13.0, 16.2, "Second pass, seventy-five. Slow and steady on the wrench."],
  [16.6, 20.0, "Final pass to one ten. Watch the click, don't bounce it."],
  [20.3, 23.6, "Fifty-one kay en on four. That's where we want it."],
];

/** Priya on the bore gauge, as an SRT muxed into the clip. */
const BORE_TALK = [
  "1\n00:00:00,800 --> 00:00:04,000\nZeroing the bore gauge in the mic first, at the nominal size.\n",
  "2\n00:00:04,300 --> 00:00:08,500\nCylinder three, top of the ring travel, thrust side.\n",
  "3\n00:00:08,800 --> 00:00:12,600\nRock it gently and read the smallest number on the dial.\n",
  "4\n00:00:13,000 --> 00:00:17,200\nSame again at ninety degrees, then down at the bottom of the travel.\n",
].join("\n");

export async function seedCaptions(db: Db): Promise<number> {
  let added = 0;
  const [stud] = await db.select({ id: recordings.id }).from(recordings).where(eq(recordings.id, DEMO_ID));
  const [had] = await db.select({ id: captionSources.recordingId }).from(captionSources).where(eq(captionSources.recordingId, DEMO_ID));
  if (stud && !had) {
    await db
      .insert(captionSources)
      .values({ recordingId: DEMO_ID, kind: "file", name: "IMG_0412 stud test.srt", format: "srt", attachedBy: "demo-marcus" });
    const rows = await db
      .insert(captionCues)
      .values(STUD_TALK.map(([startS, endS, text], i) => ({ recordingId: DEMO_ID, position: i + 1, startS, endS, text })))
      .returning();
    // The phone's transcription heard "molly"; Tomás corrected it (kept in the line's history).
    const misheard = rows[1];
    const corrected = misheard.text.replace("molly", "moly");
    await db.update(captionCues).set({ text: corrected, version: 2 }).where(eq(captionCues.id, misheard.id));
    await db
      .insert(captionEdits)
      .values({ cueId: misheard.id, version: 2, textBefore: misheard.text, textAfter: corrected, editedBy: "demo-tomas" });
    added++;
  }

  const [bore] = await db.select({ id: recordings.id }).from(recordings).where(eq(recordings.id, BORE_CLIP_ID));
  if (!bore && fs.existsSync("/usr/bin/ffmpeg")) {
    const dir = path.join(path.resolve(process.env.UPLOAD_DIR ?? "uploads"), "recordings", BORE_CLIP_ID);
    fs.mkdirSync(dir, { recursive: true });
    const file = path.join(dir, "original");
    const srt = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "seed-captions-")), "bore.srt");
    fs.writeFileSync(srt, BORE_TALK);
    // 18 s test pattern with a tone and the talk as a mov_text track, as a phone writes it.
    execFileSync("/usr/bin/ffmpeg", [
      ...["-hide_banner", "-loglevel", "error", "-y"],
      ...["-f", "lavfi", "-i", "testsrc2=duration=18:size=640x360:rate=25"],
      ...["-f", "lavfi", "-i", "sine=frequency=330:duration=18"],
      ...["-i", srt],
      ...["-map", "0:v", "-map", "1:a", "-map", "2:s"],
      ...["-c:v", "libx264", "-preset", "veryfast", "-crf", "32", "-pix_fmt", "yuv420p", "-c:a", "aac", "-b:a", "48k", "-c:s", "mov_text"],
      ...["-movflags", "+faststart", "-f", "mp4", file],
    ]);
    fs.rmSync(path.dirname(srt), { recursive: true, force: true });
    // Left in "processing": the worker reads the subtitle track out as the recording's captions.
    await db.insert(recordings).values({
      id: BORE_CLIP_ID,
      title: "Bore gauge check, cylinder 3, 2.3 L block",
      description: "Priya zeroes the bore gauge and reads cylinder 3 at the top and bottom of the ring travel, thrust side and at 90°.",
      tags: ["bore", "cylinder 3"],
      state: "processing",
      originalName: "IMG_0431 bore check.mp4",
      originalSize: fs.statSync(file).size,
      uploadedBy: "demo-priya",
    });
    added++;
  }
  return added;
}
