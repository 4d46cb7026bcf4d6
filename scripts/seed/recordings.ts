// Demo recordings for the invented Larkspur Engine Works (PRODUCT.md): a short clip generated
// with ffmpeg (no video is committed), with marks and a clamp-load series as readings. The
// recording is left in "processing"; the worker picks it up at start and makes it ready.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { marks, readings, recordings } from "../../app/db/schema";

export const DEMO_ID = "5eed0000-0000-4000-8000-00000000c1a9";

type Db = NodePgDatabase<Record<string, unknown>>;

export async function seedRecordings(db: Db): Promise<number> {
  const [have] = await db.select({ id: recordings.id }).from(recordings).where(eq(recordings.id, DEMO_ID));
  if (have) return 0;
  if (!fs.existsSync("/usr/bin/ffmpeg")) {
    console.log("[seed] ffmpeg missing: no demo recording");
    return 0;
  }
  const dir = path.join(path.resolve(process.env.UPLOAD_DIR ?? "uploads"), "recordings", DEMO_ID);
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, "original");
  // 24 s test pattern with a tone, H.264/AAC; small (well under 1 MB).
  execFileSync("/usr/bin/ffmpeg", [
    "-hide_banner",
    "-loglevel",
    "error",
    "-y",
    "-f",
    "lavfi",
    "-i",
    "testsrc2=duration=24:size=640x360:rate=25",
    "-f",
    "lavfi",
    "-i",
    "sine=frequency=440:duration=24",
    "-c:v",
    "libx264",
    "-preset",
    "veryfast",
    "-crf",
    "32",
    "-pix_fmt",
    "yuv420p",
    "-c:a",
    "aac",
    "-b:a",
    "48k",
    "-movflags",
    "+faststart",
    "-f",
    "mp4",
    file,
  ]);
  const size = fs.statSync(file).size;
  await db.insert(recordings).values({
    id: DEMO_ID,
    title: "Head stud clamp-load test, M12×1.5, moly lube",
    description:
      "Marcus torques studs 1–4 of the 2.3 L block in three passes on the load-cell fixture; Tomás reads the clamp load off the cell after each pass.",
    tags: ["head studs", "clamp load", "moly"],
    state: "processing",
    originalName: "IMG_0412 stud test.mp4",
    originalSize: size,
    uploadedBy: "demo-marcus",
  });
  await db.insert(marks).values([
    {
      recordingId: DEMO_ID,
      tStart: 1.5,
      text: "Studs chased and cleaned; moly on threads and under the nut",
      tags: ["prep", "moly"],
      createdBy: "demo-marcus",
    },
    { recordingId: DEMO_ID, tStart: 6, tEnd: 11, text: "Pass 1 to 40 N·m, centre out", tags: ["torque"], createdBy: "demo-marcus" },
    { recordingId: DEMO_ID, tStart: 13.2, text: "Pass 2 to 75 N·m", tags: ["torque"], createdBy: "demo-marcus" },
    {
      recordingId: DEMO_ID,
      tStart: 18.4,
      text: "Final pass 110 N·m; stud 4 reads 51 kN",
      tags: ["torque", "clamp load"],
      createdBy: "demo-tomas",
    },
  ]);
  const pass = (n: number) => ({ pass: String(n), lube: "moly", tool: "click wrench #3" });
  // Each reading names its stud in the position field (positions.ts), not in the label.
  const torque = (t: number, stud: number, n: number, at: number) => ({
    recordingId: DEMO_ID,
    quantity: "torque",
    fastener: stud,
    valueEntered: t,
    unitEntered: "N.m",
    valueSi: t,
    conditions: pass(n),
    t: at,
    createdBy: "demo-tomas",
  });
  const clamp = (kN: number, stud: number, n: number, at: number) => ({
    recordingId: DEMO_ID,
    quantity: "clamp-load",
    fastener: stud,
    valueEntered: kN,
    unitEntered: "kN",
    valueSi: kN * 1000,
    conditions: pass(n),
    t: at,
    createdBy: "demo-tomas",
  });
  await db
    .insert(readings)
    .values([
      torque(40, 4, 1, 10.5),
      clamp(18.1, 4, 1, 10.9),
      torque(75, 4, 2, 15.0),
      clamp(34.6, 4, 2, 15.4),
      torque(110, 1, 3, 19.0),
      clamp(49.8, 1, 3, 19.3),
      torque(110, 2, 3, 20.1),
      clamp(52.3, 2, 3, 20.4),
      torque(110, 3, 3, 21.2),
      clamp(50.6, 3, 3, 21.5),
      torque(110, 4, 3, 22.3),
      clamp(51.0, 4, 3, 22.6),
    ]);
  return 1;
}
