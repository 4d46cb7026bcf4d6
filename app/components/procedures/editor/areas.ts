export const AREA_OPTIONS = [
  { value: "block", label: "Block" },
  { value: "heads", label: "Heads" },
  { value: "fasteners", label: "Fasteners" },
  { value: "rotating-assembly", label: "Rotating assembly" },
  { value: "assembly", label: "Assembly" },
  { value: "qc", label: "QC" },
];
