import { describe, expect, it } from "vitest";
import { bothSystems, limitsBothSystems, otherUnit } from "./format";

describe("search text in both unit systems", () => {
  it("writes a spec's limits in the entered and the other system", () => {
    // 0.0030 in × 25.4 = 0.0762 mm; 0.0035 in × 25.4 = 0.0889 mm (1 in = 25.4 mm exactly, NIST SP 811 B.8).
    expect(limitsBothSystems({ min: 0.003, max: 0.0035, nominal: null, unit: "in" })).toBe("0.0030–0.0035 in (0.076–0.089 mm)");
    expect(limitsBothSystems({ min: null, max: 0.0005, nominal: null, unit: "in" })).toBe("max 0.0005 in (max 0.013 mm)");
  });

  it("writes a reading's value in both systems", () => {
    // 110 N·m ÷ 1.3558179483314004 N·m per ft·lbf = 81.13 ft·lbf (NIST SP 811 B.8); typed to 1 N·m,
    // a step of 0.74 ft·lbf, so shown to 0.1 ft·lbf.
    expect(bothSystems(110, "N.m")).toBe("110 N·m (81.1 ft·lbf)");
    // 51 kN = 51000 N ÷ 4.4482216152605 N/lbf = 11465 lbf (a step of 225 lbf: whole pounds), no separator.
    expect(bothSystems(51, "kN")).toBe("51 kN (11465 lbf)");
    // Typed as 88.010 mm: the zero stays; 88.010 ÷ 25.4 = 3.46496 in (a step of 0.00004 in).
    expect(bothSystems(88.01, "mm", 3)).toBe("88.010 mm (3.46496 in)");
    expect(otherUnit("degF")).toBe("degC");
  });
});

import { bestLine, blockFragment, bodySnippet } from "./query.server";

describe("pointing a procedure hit at its block", () => {
  const hl = (w: string) => `\uE000${w}\uE001`;
  it("picks the line (block) of a cropped body with the most distinct highlighted words, the first of equals", () => {
    const crop = `…values are ${hl("torque")} figures\nRun head ${hl("studs")} to ${hl("torque")} in three passes\nCheck ${hl("torque")} again…`;
    expect(bestLine(crop)).toBe(`Run head ${hl("studs")} to ${hl("torque")} in three passes`);
    // One word said three times loses to two different words; among equals, more marks win.
    expect(bestLine(`${hl("torque")} ${hl("torque")} ${hl("Torque")}\n${hl("stud")} ${hl("torque")}`)).toBe(
      `${hl("stud")} ${hl("torque")}`,
    );
    expect(bestLine(`${hl("stud")} once\n${hl("stud")} and ${hl("stud")}`)).toBe(`${hl("stud")} and ${hl("stud")}`);
    expect(bestLine(`a ${hl("x")}\nb ${hl("y")}`)).toBe(`a ${hl("x")}`);
    expect(bestLine("nothing highlighted\nhere")).toBeNull();
  });

  it("shows a cropped body as one run of text, without the heading marks of its blocks", () => {
    expect(bodySnippet(`…the heads leak.\n## Steps\n• Check that every case ${hl("stud")} is…`)).toBe(
      `…the heads leak. Steps • Check that every case ${hl("stud")} is…`,
    );
    expect(bodySnippet("# Why\n\nplain")).toBe("Why plain");
  });

  it("builds a text fragment from the snippet's first words, without markers or prefixes", () => {
    expect(blockFragment(`• Torque ${hl("stud")} 4 to 110 N·m in three passes`)).toBe(
      `#:~:text=${encodeURIComponent("Torque stud 4 to 110 N·m")}`,
    );
    expect(blockFragment("…plate-honed bore checked")).toBe("#:~:text=plate%2Dhoned%20bore%20checked");
    expect(blockFragment("")).toBe("");
  });
});
