import { describe, expect, it } from "vitest";
import { diffAmendment, readingsAtVersion, type HeaderFields } from "./history";

const header: HeaderFields = {
  title: "Bore check after honing",
  engineSerial: "LX23-0412",
  testedOn: "2024-03-12",
  notes: "",
  recordingStartS: null,
  recordingEndS: null,
};
const labels = new Map([
  ["bore", "Bore diameter"],
  ["gap", "Top ring end gap"],
]);

describe("amendment history", () => {
  it("names each changed field and each spec whose readings changed, with before and after", () => {
    const changes = diffAmendment(
      {
        header,
        readings: [
          { specId: "bore", value: 88.015, unit: "mm", note: "cyl 2 top" },
          { specId: "gap", value: 0.5, unit: "mm", note: "" },
        ],
      },
      {
        header: { ...header, engineSerial: "LX23-0421" },
        readings: [
          { specId: "bore", value: 88.011, unit: "mm", note: "cyl 2 top" },
          { specId: "gap", value: 0.5, unit: "mm", note: "" },
        ],
      },
      labels,
    );
    expect(changes).toEqual([
      { kind: "field", key: "engineSerial", label: "Engine serial", before: "LX23-0412", after: "LX23-0421" },
      { kind: "spec", key: "bore", label: "Bore diameter", before: "88.015 mm (cyl 2 top)", after: "88.011 mm (cyl 2 top)" },
    ]);
  });

  it("records a spec that gains or loses all its readings as not measured on that side", () => {
    const changes = diffAmendment(
      { header, readings: [{ specId: "bore", value: 88.006, unit: "mm", note: "" }] },
      {
        header,
        readings: [
          { specId: "bore", value: 88.006, unit: "mm", note: "" },
          { specId: "gap", value: 0.02, unit: "in", note: "" },
        ],
      },
      labels,
    );
    expect(changes).toEqual([{ kind: "spec", key: "gap", label: "Top ring end gap", before: "not measured", after: "0.02 in" }]);
  });

  it("reports nothing when nothing changed", () => {
    const r = [{ specId: "bore", value: 88.006, unit: "mm", note: "" }];
    expect(diffAmendment({ header, readings: r }, { header, readings: r }, labels)).toEqual([]);
  });

  it("keeps the original: the readings at version 0 stay readable after amendments", () => {
    const rows = [
      { version: 0, v: 88.015 },
      { version: 0, v: 88.006 },
      { version: 1, v: 88.011 },
      { version: 1, v: 88.006 },
      { version: 2, v: 88.01 },
    ];
    expect(readingsAtVersion(rows, 0).map((r) => r.v)).toEqual([88.015, 88.006]);
    expect(readingsAtVersion(rows, 1).map((r) => r.v)).toEqual([88.011, 88.006]);
    expect(readingsAtVersion(rows, 2).map((r) => r.v)).toEqual([88.01]);
    expect(readingsAtVersion(rows, 5).map((r) => r.v)).toEqual([88.01]);
  });
});
