// Issue 17: captions attached to a recording (WebVTT or SRT), checked with reasons, corrected
// with who and when, served and exported as files, and found by search at their second.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { recordings } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, type TestUser, waitFor } from "../support/app";

let builder: TestUser;
let qc: TestUser;
let apprentice: TestUser;
let recordingId: string;
/** A word of this run's own, so that search finds only this file's line. */
const word = `glyde${randomUUID().slice(0, 6)}`;

const base = () => `/api/recordings/${recordingId}/captions`;

/** A caption file as the browser's form sends it (multipart, field `file`). */
function fileForm(name: string, text: string): FormData {
  const form = new FormData();
  form.append("file", new File([text], name, { type: "text/plain" }));
  return form;
}

const attach = (user: TestUser, name: string, text: string) =>
  http(base(), { method: "POST", cookie: user.cookie, body: fileForm(name, text) });

type Cue = {
  id: string;
  start: number;
  end: number;
  text: string;
  version: number;
  edits: { textBefore: string; textAfter: string; editorName: string | null }[];
};

async function cues(user: TestUser): Promise<Cue[]> {
  const res = await http(base(), { cookie: user.cookie });
  expect(res.status).toBe(200);
  return ((await res.json()) as { cues: Cue[] }).cues;
}

// SRT's common form: counter, "hh:mm:ss,mmm --> hh:mm:ss,mmm", text, blank line; CRLF as Windows programs write it.
const SRT = [
  "1",
  "00:00:02,000 --> 00:00:05,500",
  "Clean the threads and blow out the holes.",
  "",
  "2",
  "00:00:12,250 --> 00:00:16,000",
  `Molly on the threads, ${word} under the nut face.`,
  "",
  "3",
  "00:00:17,000 --> 00:00:20,000",
  "Then snug them in the sequence.",
  "",
].join("\r\n");

beforeAll(async () => {
  builder = await createUser("builder");
  qc = await createUser("qc");
  apprentice = await createUser("apprentice");
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: `Stud lube talk ${word}`,
      state: "ready",
      originalName: "studs.mp4",
      originalSize: 1,
      durationS: 30,
      uploadedBy: builder.id,
    })
    .returning();
  recordingId = rec.id;
});

describe("attaching captions", () => {
  it("refuses a file whose cue ends after the recording, naming the cue and the times", async () => {
    const res = await attach(builder, "late.vtt", "WEBVTT\n\n00:00:10.000 --> 00:00:45.000\nToo long\n");
    expect(res.status).toBe(422);
    const body = (await res.json()) as { reason: string; issues: { path: string; message: string }[] };
    expect(body.issues).toEqual([{ path: "file", message: "Cue 1: Ends at 0:45.0, after the recording's end (0:30.0)." }]);
    expect(body.reason).toContain("Cue 1");
  });

  it("refuses markup, a file that is no caption file, and a form without a file, each with its reason", async () => {
    const markup = await attach(builder, "x.vtt", 'WEBVTT\n\n00:00:01.000 --> 00:00:02.000\n<a href="x">Click</a>\n');
    expect(markup.status).toBe(422);
    expect(JSON.stringify(await markup.json())).toContain("markup that is not caption text");
    const notCaptions = await attach(builder, "notes.txt", "Just some notes about the job.");
    expect(notCaptions.status).toBe(422);
    expect(((await notCaptions.json()) as { reason: string }).reason).toContain("not a caption file");
    const none = await http(base(), { method: "POST", cookie: builder.cookie, form: {} });
    expect(none.status).toBe(422);
    expect(await cues(builder)).toEqual([]);
  });

  it("is refused to an apprentice with the shop's words", async () => {
    const res = await attach(apprentice, "talk.srt", SRT);
    expect(res.status).toBe(403);
    expect(((await res.json()) as { reason: string }).reason).toMatch(
      /^Apprentices can .* but not attach or correct a recording's captions\./,
    );
  });

  it("takes an SRT file (CRLF) and lists its lines with their times", async () => {
    const res = await attach(builder, "talk.srt", SRT);
    expect(res.status).toBe(201);
    expect(await res.json()).toEqual({ cues: 3, format: "srt" });
    const list = await cues(apprentice);
    expect(list.map((c) => [c.start, c.end, c.text])).toEqual([
      [2, 5.5, "Clean the threads and blow out the holes."],
      [12.25, 16, `Molly on the threads, ${word} under the nut face.`],
      [17, 20, "Then snug them in the sequence."],
    ]);
  });
});

describe("correcting a line", () => {
  it("keeps every correction with who and when, refuses a stale version, and the served files follow", async () => {
    const line = (await cues(builder))[1];
    const url = `${base()}/${line.id}`;
    const fixed = `Moly on the threads, ${word} under the nut face.`;
    const res = await http(url, { method: "PATCH", cookie: qc.cookie, json: { text: fixed, version: 1 } });
    expect(res.status).toBe(200);
    expect(((await res.json()) as { cue: { version: number } }).cue.version).toBe(2);

    const stale = await http(url, { method: "PATCH", cookie: builder.cookie, json: { text: "Something else", version: 1 } });
    expect(stale.status).toBe(409);
    const empty = await http(url, { method: "PATCH", cookie: builder.cookie, json: { text: "  ", version: 2 } });
    expect(empty.status).toBe(422);
    const apprenticeTry = await http(url, { method: "PATCH", cookie: apprentice.cookie, json: { text: "x", version: 2 } });
    expect(apprenticeTry.status).toBe(403);

    const one = await http(url, { cookie: apprentice.cookie });
    const { cue } = (await one.json()) as { cue: Cue };
    expect(cue.text).toBe(fixed);
    expect(cue.edits).toEqual([
      expect.objectContaining({ textBefore: `Molly on the threads, ${word} under the nut face.`, textAfter: fixed, editorName: qc.name }),
    ]);

    const vtt = await http(`/api/recordings/${recordingId}/captions.vtt`, { cookie: apprentice.cookie });
    expect(vtt.status).toBe(200);
    expect(vtt.headers.get("content-type")).toContain("text/vtt");
    expect(await vtt.text()).toContain(`00:00:12.250 --> 00:00:16.000\n${fixed}`);

    const srt = await http(`/api/recordings/${recordingId}/captions.srt?download=1`, { cookie: apprentice.cookie });
    expect(srt.headers.get("content-disposition")).toContain(".srt");
    expect((await srt.text()).split("\n").slice(4, 7)).toEqual(["2", "00:00:12,250 --> 00:00:16,000", fixed]);

    expect((await http(`/api/recordings/${recordingId}/captions.vtt`)).status).toBe(401);
  });
});

describe("search", () => {
  type Hit = { kind: string; url: string; t?: number; title: string; snippet: string };
  const search = async (user: TestUser, q: string) =>
    ((await (await http(`/api/search?q=${encodeURIComponent(q)}`, { cookie: user.cookie })).json()) as { hits: Hit[] }).hits;

  it("finds the corrected line at its second, with its neighbours and recording, for an apprentice too", async () => {
    const hit = await waitFor(async () =>
      (await search(apprentice, `${word} moly`)).find((h) => h.kind === "caption" && h.snippet.includes("Moly")),
    );
    expect(hit.url).toBe(`/recordings/${recordingId}?t=12.25`);
    expect(hit.t).toBe(12.25);
    expect(hit.title).toBe(`Stud lube talk ${word}`);
    expect(hit.snippet).toContain("Clean the threads and blow out the holes.");
    expect(hit.snippet).toContain("Then snug them in the sequence.");
  });

  it("applies the trade's search words (molybdenum disulfide finds moly) and ranks a mark with the same words above the line", async () => {
    const hit = await waitFor(async () =>
      (await search(builder, `${word} molybdenum disulfide`)).find((h) => h.kind === "caption" && h.url.includes(recordingId)),
    );
    expect(hit.t).toBe(12.25);
    const mark = await http(`/api/recordings/${recordingId}/marks`, {
      cookie: builder.cookie,
      json: { tStart: 13, text: `Moly on the threads, ${word}` },
    });
    expect(mark.status).toBe(201);
    const kinds = await waitFor(async () => {
      const hits = await search(builder, `${word} moly`);
      return hits.some((h) => h.kind === "mark") && hits.map((h) => h.kind);
    });
    expect(kinds.indexOf("mark")).toBeLessThan(kinds.indexOf("caption"));
  });
});
