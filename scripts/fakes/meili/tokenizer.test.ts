import { describe, expect, it } from "vitest";
import { normalizeTerm, scanChunks, tokenize } from "./tokenizer";

describe("tokenizer", () => {
  it("keeps designations whole and indexes their parts", () => {
    expect(tokenize("M12x1.5")).toEqual(["m12x1.5", "m12", "1.5"]);
    expect(tokenize("M12×1.5")).toEqual(["m12x1.5", "m12", "1.5"]);
    expect(tokenize("piston-to-wall")).toEqual(["piston-to-wall", "piston", "to", "wall"]);
    expect(tokenize("3/8-16 UNC")).toEqual(["3/8-16", "3", "8", "16", "unc"]);
  });

  it("keeps decimals and units", () => {
    expect(tokenize("0.0030–0.0035 in")).toEqual(["0.0030", "0030", "0.0035", "0035", "in"]);
    expect(tokenize("110 N·m")).toEqual(["110", "n·m", "n", "m", "nm"]);
    expect(tokenize("110 N⋅m")).toEqual(["110", "n·m", "n", "m", "nm"]);
    expect(tokenize("4.0005 in.")).toEqual(["4.0005", "in"]);
  });

  it("lower-cases and strips accents, splits at other punctuation", () => {
    expect(normalizeTerm("Pésti")).toBe("pesti");
    expect(tokenize('Ring gap (top): 0.018", checked!')).toEqual(["ring", "gap", "top", "0.018", "018", "checked"]);
  });

  it("gives offsets of chunks and parts in the original text", () => {
    const [c] = scanChunks("  Piston-to-wall");
    expect(c).toEqual({
      start: 2,
      end: 16,
      term: "piston-to-wall",
      parts: [
        { start: 2, end: 8, term: "piston" },
        { start: 9, end: 11, term: "to" },
        { start: 12, end: 16, term: "wall" },
      ],
    });
  });
});
