/**
 * The test-record list's filters (the page and its CSV export), from the address. A filter that
 * is not understood (a verdict we do not have, 2024-02-30, which PostgreSQL refuses) is no
 * filter rather than an error: the list still answers. Pure.
 */
import { z } from "zod";
import { isRealDate } from "~/lib/edge";
import { RECORD_VERDICTS } from "./labels";

const text = z
  .string()
  .optional()
  .transform((s) => s?.trim() || null);
const day = text.pipe(z.string().refine(isRealDate).nullable()).catch(null);

export const listSearch = z.object({
  procedure: text,
  verdict: text.pipe(z.enum(RECORD_VERDICTS).nullable()).catch(null),
  workOrder: text.transform((s) => s?.slice(0, 40) ?? null),
  from: day,
  to: day,
});

export type ListFilters = {
  procedure?: string | null;
  verdict?: string | null;
  workOrder?: string | null;
  from?: string | null;
  to?: string | null;
};
