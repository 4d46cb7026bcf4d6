/** Shop areas procedures are grouped by (PRODUCT.md). */
export const AREAS = ["block", "heads", "fasteners", "rotating-assembly", "assembly", "qc"] as const;
export type Area = (typeof AREAS)[number];
export const AREA_LABELS: Record<Area, string> = {
  block: "Block",
  heads: "Heads",
  fasteners: "Fasteners",
  "rotating-assembly": "Rotating assembly",
  assembly: "Assembly",
  qc: "QC",
};
