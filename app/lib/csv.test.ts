// Checks from the OWASP "CSV Injection" page (owasp.org/www-community/attacks/CSV_Injection):
// cells beginning with = + - @, tab or carriage return are prefixed with a single quote so a
// spreadsheet shows them as text; everything else, and every number, is written as it is.
import { describe, expect, it } from "vitest";
import { spreadsheetCsv } from "./csv";

describe("spreadsheetCsv", () => {
  it("puts a quote before text a spreadsheet would run as a formula", () => {
    const line = spreadsheetCsv([['=HYPERLINK("http://x.example","x")', "+1+1", "-2+3", "@SUM(A1:A9)", "\tcmd", "\uFF1D1"]]);
    expect(line).toBe(`"'=HYPERLINK(""http://x.example"",""x"")",'+1+1,'-2+3,'@SUM(A1:A9),'\tcmd,'\uFF1D1\n`);
  });

  it("quotes a cell that starts with a carriage return and keeps it one cell", () => {
    expect(spreadsheetCsv([["\rcmd", "b"]])).toBe(`"'\rcmd",b\n`);
  });

  it("leaves numbers alone, negative ones included, and text that only contains the characters", () => {
    expect(spreadsheetCsv([[-5, -0.25, 3.5, 0, "a-b", "stud 4 = 51 kN", "2024-02-01"]])).toBe(
      "-5,-0.25,3.5,0,a-b,stud 4 = 51 kN,2024-02-01\n",
    );
  });

  it("keeps the options it is given (header row, byte order mark)", () => {
    expect(spreadsheetCsv([{ a: "=1" }], { header: true, columns: ["a"], bom: true })).toBe("\uFEFFa\n'=1\n");
  });
});
