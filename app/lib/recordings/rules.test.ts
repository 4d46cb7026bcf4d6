import { describe, expect, it } from "vitest";
import { fileNameProblem, formatTime, markInputSchema, readingInputSchema, titleFromFileName, toStoredSI, unitsFor } from "./rules";
import { parseRange } from "./media.server";
import { damageReason, planFor, type Probe } from "./processing.server";

describe("reading rules", () => {
  const schema = readingInputSchema(120);
  it("accepts the contract's units for each quantity and stores SI", () => {
    expect(unitsFor("torque")).toEqual(["N.m", "ft.lbf", "in.lbf"]);
    expect(unitsFor("leak-down")).toEqual(["%"]);
    expect(toStoredSI("clamp-load", 51, "kN")).toBe(51000);
    expect(toStoredSI("bore-diameter", 3.4650, "in")).toBeCloseTo(0.088011, 6);
    expect(toStoredSI("temperature", 90, "degC")).toBeCloseTo(363.15, 9);
    expect(toStoredSI("leak-down", 6, "%")).toBeCloseTo(0.06, 12);
    expect(toStoredSI("other", 3200, "rpm")).toBe(3200);
  });
  it("refuses a unit of another kind, with the units that fit in the message", () => {
    const r = schema.safeParse({ quantity: "clamp-load", value: 51, unit: "N.m" });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]).toMatchObject({ path: ["unit"], message: "N.m is not a unit of clamp load; use N, kN, lbf." });
  });
  it("refuses impossible values and times beyond the video", () => {
    const msg = (x: unknown) => schema.safeParse(x).error?.issues[0]?.message;
    expect(msg({ quantity: "temperature", value: -300, unit: "degC" })).toBe("That is below absolute zero.");
    expect(msg({ quantity: "bore-diameter", value: 0, unit: "mm" })).toBe("This measurement must be greater than zero.");
    expect(msg({ quantity: "torque", value: 110, unit: "N.m", t: 121 })).toBe("The video is only 2:00.0 long.");
    expect(msg({ quantity: "other", value: 1, unit: "a/b/c/d/e/f/g/h/i" })).toMatch(/short unit/);
    expect(schema.safeParse({ quantity: "torque", value: 110, unit: "N.m", conditions: { pass: 3, lube: " moly " } }).data?.conditions).toEqual({ pass: "3", lube: "moly" });
  });
});

describe("mark rules", () => {
  it("checks times against the duration and spans for order", () => {
    const s = markInputSchema(10);
    expect(s.safeParse({ tStart: 2, tEnd: 4, text: "x" }).success).toBe(true);
    expect(s.safeParse({ tStart: 10.5, text: "x" }).error?.issues[0].path).toEqual(["tStart"]);
    expect(s.safeParse({ tStart: 4, tEnd: 4, text: "x" }).error?.issues[0].path).toEqual(["tEnd"]);
    expect(s.safeParse({ tStart: 1, text: "x", tags: ["Torque", "torque ", "moly"] }).data?.tags).toEqual(["Torque", "moly"]);
    // Unknown duration (not probed yet): only the lower bound applies.
    expect(markInputSchema(null).safeParse({ tStart: 99999, text: "x" }).success).toBe(true);
  });
});

describe("names and times", () => {
  it("refuses path separators and control characters in file names", () => {
    expect(fileNameProblem("IMG_0412.MOV")).toBeNull();
    expect(fileNameProblem("../x.mp4")).toMatch(/path separator/);
    expect(fileNameProblem("a\\b.mp4")).toMatch(/path separator/);
    expect(fileNameProblem("a\u0000b.mp4")).toMatch(/control characters/);
    expect(fileNameProblem("  ")).toMatch(/no name/);
  });
  it("formats times and titles", () => {
    expect(formatTime(83.5)).toBe("1:23.5");
    expect(formatTime(3725)).toBe("1:02:05.0");
    expect(formatTime(0)).toBe("0:00.0");
    expect(titleFromFileName("stud_test_4.mp4")).toBe("stud test 4");
  });
});

describe("Range parsing", () => {
  it("reads one range against the size", () => {
    expect(parseRange("bytes=0-99", 1000)).toEqual({ start: 0, end: 99 });
    expect(parseRange("bytes=990-", 1000)).toEqual({ start: 990, end: 999 });
    expect(parseRange("bytes=-10", 1000)).toEqual({ start: 990, end: 999 });
    expect(parseRange("bytes=-5000", 1000)).toEqual({ start: 0, end: 999 });
    expect(parseRange("bytes=500-5000", 1000)).toEqual({ start: 500, end: 999 });
    expect(parseRange(null, 1000)).toBeNull();
    expect(parseRange("bytes=0-1,5-6", 1000)).toBeNull(); // several: the whole file
  });
  it("calls unsatisfiable and malformed ranges so", () => {
    for (const h of ["bytes=1000-", "bytes=5-1", "bytes=-0", "bytes=abc", "bytes=-"]) expect(parseRange(h, 1000)).toBe("unsatisfiable");
  });
  it("ignores a range unit it does not know (RFC 9110 §14.2: the whole file)", () => {
    for (const h of ["items=0-1", "Items=0-5", "pages=1-2,4"]) expect(parseRange(h, 1000)).toBeNull();
    expect(parseRange("BYTES=0-9", 1000)).toEqual({ start: 0, end: 9 });
  });
});

describe("rendition plan", () => {
  const base: Probe = { formatName: "mov,mp4,m4a,3gp,3g2,mj2", majorBrand: "isom", durationS: 10, videoDurationS: 10, video: { codec: "h264", profile: "High", pixFmt: "yuv420p", width: 1920, height: 1080, frameRate: 30 }, audio: { codec: "aac" } };
  it("serves a faststart H.264/AAC MP4 as it is, remuxes other containers or a late index, transcodes the rest", () => {
    expect(planFor(base, ["ftyp", "moov", "mdat"])).toBe("as-is");
    expect(planFor(base, ["ftyp", "mdat", "moov"])).toBe("remux");
    expect(planFor({ ...base, majorBrand: "qt" }, ["ftyp", "moov", "mdat"])).toBe("remux");
    expect(planFor({ ...base, video: { ...base.video!, codec: "hevc" } }, ["ftyp", "moov", "mdat"])).toBe("transcode");
    expect(planFor({ ...base, video: { ...base.video!, pixFmt: "yuv420p10le", profile: "High 10" } }, ["ftyp", "moov", "mdat"])).toBe("transcode");
    expect(planFor({ ...base, audio: { codec: "pcm_s16le" } }, ["ftyp", "moov", "mdat"])).toBe("transcode");
    expect(planFor({ ...base, audio: null }, ["ftyp", "moov", "mdat"])).toBe("as-is");
  });
});

describe("damage check", () => {
  it("calls a stream that stops decoding, or decodes far short of its stated length, damaged, in plain words", () => {
    // The first 6,000 bytes of a 3 s faststart MP4: the index promises 3 s, one frame decodes.
    const cut = damageReason({ ok: false, decodedS: 0.04, error: "Invalid data found when processing input" }, 3);
    expect(cut).toMatch(/^The video is damaged: playback breaks off at 0:00\.0 of 0:03\.0\./);
    expect(cut).toContain("(Decoder: Invalid data found when processing input)");
    expect(damageReason({ ok: true, decodedS: 6, error: null }, 10)).toMatch(/only 0:06\.0 of its 0:10\.0 could be played back/);
  });
  it("accepts a stream that decodes to its stated length, within a frame or two", () => {
    expect(damageReason({ ok: true, decodedS: 3, error: null }, 3)).toBeNull();
    expect(damageReason({ ok: true, decodedS: 9.96, error: null }, 10)).toBeNull();
    expect(damageReason({ ok: true, decodedS: 595, error: null }, 600)).toBeNull(); // 2 % of a long take
  });
});
