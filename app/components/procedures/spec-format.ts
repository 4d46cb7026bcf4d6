import { unitLabel, type UnitCode } from "~/lib/calc";

export const specLimitsText = {
  unit(u: string): string {
    try {
      return unitLabel(u as UnitCode);
    } catch {
      return u;
    }
  },
};
