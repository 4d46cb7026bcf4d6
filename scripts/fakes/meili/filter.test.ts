import { describe, expect, it } from "vitest";
import { FilterSyntaxError, parseFilterExpression, parseFilterParam, type FilterNode } from "./filter";

/** A compact rendering of a parsed filter, for readable expectations. */
function show(n: FilterNode | null): string {
  if (!n) return "∅";
  switch (n.kind) {
    case "and":
      return `AND(${n.nodes.map(show).join(", ")})`;
    case "or":
      return `OR(${n.nodes.map(show).join(", ")})`;
    case "not":
      return `NOT(${show(n.node)})`;
    case "in":
      return `${n.fid.value} IN[${n.values.map((v) => v.value).join(",")}]`;
    case "cond": {
      const c = n.cond;
      if (c.op === "TO") return `${n.fid.value} ${c.from.value} TO ${c.to.value}`;
      if ("value" in c) return `${n.fid.value} ${c.op} ${c.value.value}`;
      return `${n.fid.value} ${c.op}`;
    }
  }
}

const p = (s: string) => show(parseFilterExpression(s));
const err = (s: string) => {
  try {
    parseFilterExpression(s);
  } catch (e) {
    expect(e).toBeInstanceOf(FilterSyntaxError);
    return (e as Error).message;
  }
  throw new Error(`expected ${JSON.stringify(s)} to be rejected`);
};

const OPS =
  "`=`, `!=`, `>=`, `>`, `<=`, `<`, `IN`, `NOT IN`, `TO`, `EXISTS`, `NOT EXISTS`, `IS NULL`, `IS NOT NULL`, `IS EMPTY`, `IS NOT EMPTY`, `CONTAINS`, `NOT CONTAINS`, `STARTS WITH`, `NOT STARTS WITH`, `_geoRadius`, or `_geoBoundingBox`";

describe("filter parser: valid expressions", () => {
  it("parses comparisons, quotes and numbers", () => {
    expect(p("kind = procedure")).toBe("kind = procedure");
    expect(p("state != draft")).toBe("state != draft");
    expect(p("'procedure state' = \"in review\"")).toBe("procedure state = in review");
    expect(p("torque = 110")).toBe("torque = 110");
    expect(p("clearance = 0.0035")).toBe("clearance = 0.0035");
    expect(p("thread = m12x1.5")).toBe("thread = m12x1.5");
    expect(p("year >= 2020")).toBe("year >= 2020");
    expect(p("t 10 TO 20")).toBe("t 10 TO 20");
  });

  it("parses IN, NOT IN, NOT, EXISTS, IS NULL / EMPTY", () => {
    expect(p("tag IN [pistons, 'head studs', bore,]")).toBe("tag IN[pistons,head studs,bore]");
    expect(p("tag IN[]")).toBe("tag IN[]");
    expect(p("tag NOT IN [a, b]")).toBe("NOT(tag IN[a,b])");
    expect(p("NOT kind = mark")).toBe("NOT(kind = mark)");
    expect(p("NOT NOT kind = mark")).toBe("kind = mark");
    expect(p("uploader EXISTS")).toBe("uploader EXISTS");
    expect(p("uploader NOT EXISTS")).toBe("NOT(uploader EXISTS)");
    expect(p("uploader IS NULL")).toBe("uploader NULL");
    expect(p("uploader IS NOT EMPTY")).toBe("NOT(uploader EMPTY)");
  });

  it("gives AND precedence over OR, and honours parentheses", () => {
    expect(p("a = 1 AND b = 2 OR c = 3")).toBe("OR(AND(a = 1, b = 2), c = 3)");
    expect(p("a = 1 AND (b = 2 OR c = 3)")).toBe("AND(a = 1, OR(b = 2, c = 3))");
    expect(p("  (visibility = public OR role IN [builder, lead]) AND NOT state = draft ")).toBe(
      "AND(OR(visibility = public, role IN[builder,lead]), NOT(state = draft))",
    );
  });

  it("lets quoted keywords be names and values", () => {
    expect(p(`NOT "OR" EXISTS AND "EXISTS" NOT EXISTS`)).toBe("AND(NOT(OR EXISTS), NOT(EXISTS EXISTS))");
    expect(p("x = 'AND'")).toBe("x = AND");
    expect(p(`title = 'it\\'s'`)).toBe("title = it's");
  });

  it("treats an empty expression as no filter", () => {
    expect(parseFilterExpression("   ")).toBeNull();
  });

  it("accepts nested arrays: outer AND, inner OR", () => {
    const f = parseFilterParam(["kind = procedure", ["tag = pistons", "tag = bore"], ""]);
    expect(f && "and" in f && f.and.length).toBe(2);
    const inner = f && "and" in f ? f.and[1] : null;
    expect(inner && "or" in inner && inner.or.length).toBe(2);
    expect(() => parseFilterParam([["a = 1", ["b = 2"]]])).toThrow(/Invalid syntax for the filter parameter/);
    expect(() => parseFilterParam(12)).toThrow(/Invalid syntax for the filter parameter/);
  });
});

describe("filter parser: malformed expressions give Meilisearch's diagnostics", () => {
  // expected messages as the real filter parser words them
  it.each([
    [
      "channel = Ponce = 12",
      "Found unexpected characters at the end of the filter: `= 12`. You probably forgot an `OR` or an `AND` rule.\n17:21 channel = Ponce = 12",
    ],
    ["channel =    ", "Was expecting a value but instead got nothing.\n14:14 channel =    "],
    ["channel = 🐻", "Was expecting a value but instead got `🐻`.\n11:12 channel = 🐻"],
    ["'OR'", `Was expecting an operation ${OPS} at \`\\'OR\\'\`.\n1:5 'OR'`],
    [
      "OR",
      "Was expecting a value but instead got `OR`, which is a reserved keyword. To use `OR` as a field name or a value, surround it by quotes.\n1:3 OR",
    ],
    ["channel Ponce", `Was expecting an operation ${OPS} at \`channel Ponce\`.\n1:14 channel Ponce`],
    ["channel = Ponce OR", `Was expecting an operation ${OPS} but instead got nothing.\n19:19 channel = Ponce OR`],
    ["channel = 'ponce", "Expression `\\'ponce` is missing the following closing delimiter: `'`.\n11:17 channel = 'ponce"],
    [
      "channel = mv OR (followers >= 1000",
      "Expression `(followers >= 1000` is missing the following closing delimiter: `)`.\n17:35 channel = mv OR (followers >= 1000",
    ],
    [
      "channel = mv OR followers >= 1000)",
      "Found unexpected characters at the end of the filter: `)`. You probably forgot an `OR` or an `AND` rule.\n34:35 channel = mv OR followers >= 1000)",
    ],
    ["colour IN blue, green]", "Expected `[` after `IN` keyword.\n11:23 colour IN blue, green]"],
    [
      "colour IN [blue, green, 'blue' > 2]",
      "Expected only comma-separated field names inside `IN[..]` but instead found `> 2]`.\n32:36 colour IN [blue, green, 'blue' > 2]",
    ],
    ["colour IN [blue, green", "Expected matching `]` after the list of field names given to `IN[`\n23:23 colour IN [blue, green"],
    [
      "x = EXISTS",
      "Was expecting a value but instead got `EXISTS`, which is a reserved keyword. To use `EXISTS` as a field name or a value, surround it by quotes.\n5:11 x = EXISTS",
    ],
    ["title & Glass", `Was expecting an operation ${OPS} at \`title & Glass\`.\n1:14 title & Glass`],
    [
      "title = Glass XOR title = Glass",
      "Found unexpected characters at the end of the filter: `XOR title = Glass`. You probably forgot an `OR` or an `AND` rule.\n15:32 title = Glass XOR title = Glass",
    ],
  ])("%j", (input, message) => {
    expect(err(input)).toBe(message);
  });

  it("limits nesting depth", () => {
    const deep = `${"(".repeat(51)}x = 1${")".repeat(51)}`;
    expect(err(deep)).toMatch(/^The filter exceeded the maximum depth limit/);
    expect(p(`${"(".repeat(49)}x = 1${")".repeat(49)}`)).toBe("x = 1");
  });
});
