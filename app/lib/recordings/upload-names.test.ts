import { describe, expect, it } from "vitest";
import { fileNameProblem, titleFromFileName } from "./upload-names";

describe("upload file names", () => {
  it("refuses path separators and control characters in file names", () => {
    expect(fileNameProblem("IMG_0412.MOV")).toBeNull();
    expect(fileNameProblem("../x.mp4")).toMatch(/path separator/);
    expect(fileNameProblem("a\\b.mp4")).toMatch(/path separator/);
    expect(fileNameProblem("a\u0000b.mp4")).toMatch(/control characters/);
    expect(fileNameProblem("  ")).toMatch(/no name/);
  });
  it("makes a title of a file name", () => {
    expect(titleFromFileName("stud_test_4.mp4")).toBe("stud test 4");
    expect(titleFromFileName(".mov")).toBe("Untitled recording");
  });
});
