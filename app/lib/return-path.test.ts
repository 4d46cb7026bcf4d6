import { describe, expect, it } from "vitest";
import { safeReturnPath } from "./return-path";

// Each vector is a known way past string checks on a redirect target. The source of the
// parsing rules: the WHATWG URL Standard, §4.4 "URL parsing" (backslash as a path separator
// for special schemes, ASCII tab and newline removed, leading C0 control or space stripped,
// single-dot and double-dot path segments).
const origin = "http://127.0.0.1:3000";

describe("safeReturnPath", () => {
  it.each([
    ["/\\evil.example", "backslash read as a slash (next=/%5Cevil.example)"],
    ["/\t/evil.example", "tab dropped (next=/%09/evil.example)"],
    ["/\n/evil.example", "newline dropped"],
    ["/\\\\evil.example", "two backslashes (next=/%5C%5Cevil.example)"],
    ["\\\\evil.example", "backslashes only"],
    ["//evil.example", "scheme-relative"],
    [" //evil.example", "leading space stripped"],
    ["/.//evil.example", "dot segment collapsing to //"],
    ["/..//evil.example", "double-dot segment collapsing to //"],
    ["http://127.0.0.1:3000//evil.example", "own origin with a path of //"],
    ["https://evil.example/", "absolute URL elsewhere"],
    ["http://127.0.0.1:3001/", "same host, other port"],
    ["javascript:alert(1)", "script URL"],
    ["data:text/html,<p>x</p>", "data URL"],
  ])("refuses %j (%s)", (next) => {
    expect(safeReturnPath(next, origin)).toBe("/");
  });

  it("keeps a same-origin path with its query and fragment, as the parser writes it", () => {
    expect(safeReturnPath("/procedures/head-gasket?rev=2#torque", origin)).toBe("/procedures/head-gasket?rev=2#torque");
    expect(safeReturnPath("/admin/people?x=1", origin)).toBe("/admin/people?x=1");
    expect(safeReturnPath("/%5Cevil.example", origin)).toBe("/%5Cevil.example"); // still encoded: a path on this site
    expect(safeReturnPath("/a/../b", origin)).toBe("/b");
    expect(safeReturnPath(`${origin}/recordings`, origin)).toBe("/recordings");
  });

  it("answers / for nothing, non-strings and unparsable values", () => {
    expect(safeReturnPath(undefined, origin)).toBe("/");
    expect(safeReturnPath(null, origin)).toBe("/");
    expect(safeReturnPath("", origin)).toBe("/");
    expect(safeReturnPath(["/x"], origin)).toBe("/");
    expect(safeReturnPath("http://[::1", origin)).toBe("/");
  });
});
