import { describe, expect, test } from "vitest";
import * as calc from "./index";

// docs/calculations.md: the tables carry their sources, and the module stays pure.
describe("the module's entry and purity", () => {
  test("the tables the UI needs are there, each with a source", () => {
    expect(calc.THREAD_PRESETS.length).toBeGreaterThan(10);
    expect(calc.PROPERTY_CLASSES.map((p) => p.id)).toEqual(["8.8", "10.9", "12.9", "SAE-5", "SAE-8"]);
    expect(calc.MATERIALS.map((m) => m.id)).toEqual([...calc.MATERIAL_IDS]);
    for (const t of [calc.NUT_FACTOR_PRESETS, calc.MATERIALS, calc.PROPERTY_CLASSES]) {
      for (const row of t) expect(row.source).toBeTruthy();
    }
  });

  test("source files import only zod and each other: no DOM, no Node built-ins, no database", () => {
    const sources = import.meta.glob(["./*.ts", "!./*.test.ts"], { query: "?raw", import: "default", eager: true }) as Record<
      string,
      string
    >;
    expect(Object.keys(sources).length).toBeGreaterThan(5);
    for (const [file, text] of Object.entries(sources)) {
      const imports = [...text.matchAll(/\bfrom\s+"([^"]+)"/g)].map((m) => m[1]);
      for (const spec of imports) expect(spec === "zod" || spec.startsWith("./"), `${file} imports ${spec}`).toBe(true);
      expect(text, file).not.toMatch(/\b(window|document|localStorage|process|require)\s*[.(]/);
    }
  });
});
