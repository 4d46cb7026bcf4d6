import type { Position } from "~/lib/recordings/positions";

/** Shapes the watch page gets from its loader (dates arrive as strings after serialisation). */
export type MarkRow = {
  id: string;
  tStart: number;
  tEnd: number | null;
  text: string;
  tags: string[];
  procedureId: string | null;
  procedureTitle: string | null;
  procedureSlug: string | null;
  /** The build the mark is on, by number (it may differ from its recording's). */
  buildNumber?: string | null;
  createdBy: string | null;
  authorName: string | null;
  pending?: boolean;
};

export type ReadingRow = {
  id: string;
  quantity: string;
  label: string;
  valueSi: number;
  valueEntered: number;
  /** Decimals typed (88.010 → 3); null when not known. */
  valueDecimals: number | null;
  unitEntered: string;
  conditions: { lube?: string; tool?: string; pass?: string; note?: string };
  t: number | null;
  createdBy: string | null;
  authorName: string | null;
  pending?: boolean;
} & Position;

export type ProcedureChoice = { id: string; title: string; area: string };

export type Issue = { path: string; message: string };

export function issuesByPath(data: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  const issues = (data as { issues?: Issue[] } | undefined)?.issues;
  if (Array.isArray(issues)) for (const i of issues) out[i.path || "form"] ??= i.message;
  const reason = (data as { reason?: string } | undefined)?.reason;
  if (reason && !out.form) out.form = reason;
  return out;
}
