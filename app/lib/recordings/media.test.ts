import { describe, expect, it } from "vitest";
import { parseRange } from "./media.server";
import { damageReason, planFor, type Probe } from "./processing.server";

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
  const base: Probe = {
    formatName: "mov,mp4,m4a,3gp,3g2,mj2",
    majorBrand: "isom",
    durationS: 10,
    videoDurationS: 10,
    video: { codec: "h264", profile: "High", pixFmt: "yuv420p", width: 1920, height: 1080, frameRate: 30 },
    audio: { codec: "aac" },
  };
  it("serves a faststart H.264/AAC MP4 as it is, remuxes other containers or a late index, transcodes the rest", () => {
    expect(planFor(base, ["ftyp", "moov", "mdat"])).toBe("as-is");
    expect(planFor(base, ["ftyp", "mdat", "moov"])).toBe("remux");
    expect(planFor({ ...base, majorBrand: "qt" }, ["ftyp", "moov", "mdat"])).toBe("remux");
    expect(planFor({ ...base, video: { ...base.video!, codec: "hevc" } }, ["ftyp", "moov", "mdat"])).toBe("transcode");
    expect(planFor({ ...base, video: { ...base.video!, pixFmt: "yuv420p10le", profile: "High 10" } }, ["ftyp", "moov", "mdat"])).toBe(
      "transcode",
    );
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
