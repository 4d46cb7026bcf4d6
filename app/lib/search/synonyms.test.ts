import { describe, expect, it } from "vitest";
import { groupProblem, MAX_WORDS, parseWordList, synonymsSetting } from "./synonyms";

describe("search words", () => {
  it("reads what someone typed: commas, semicolons or lines; trimmed, lower case, once each", () => {
    expect(parseWordList("PTW,  Piston to   wall;\n piston-to-wall , ptw,,")).toEqual(["ptw", "piston to wall", "piston-to-wall"]);
    expect(parseWordList(" , ;\n")).toEqual([]);
  });

  it("wants two to eight words, each up to 40 characters", () => {
    expect(groupProblem(["tdc"], [])).toMatch(/at least two/);
    expect(
      groupProblem(
        Array.from({ length: MAX_WORDS + 1 }, (_, i) => `w${i}`),
        [],
      ),
    ).toMatch(/up to 8/);
    expect(groupProblem(["tdc", "x".repeat(41)], [])).toMatch(/longer than 40 characters/);
    expect(groupProblem(["tdc", "top dead centre"], [])).toBeNull();
  });

  it("keeps a word in one group, but lets a group be saved with its own words", () => {
    const others = [{ id: "g1", words: ["ptw", "piston to wall"] }];
    expect(groupProblem(["ptw", "skirt clearance"], others)).toBe(
      "“ptw” is already in the group “ptw, piston to wall”. A word belongs to one group; change that group instead.",
    );
    expect(groupProblem(["ptw", "piston to wall", "piston-to-wall"], others, "g1")).toBeNull();
  });

  it("expands groups both ways into the service's synonyms setting", () => {
    expect(synonymsSetting([["ptw", "piston to wall"]])).toEqual({ ptw: ["piston to wall"], "piston to wall": ["ptw"] });
    expect(synonymsSetting([["a", "b", "c"]])).toEqual({ a: ["b", "c"], b: ["a", "c"], c: ["a", "b"] });
  });
});
