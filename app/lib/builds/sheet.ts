import { z } from "zod";
import { formatCalendarDay, formatDay } from "~/lib/dates";
import { optionalSearch } from "~/lib/edge";
import type { BuildPage } from "./page.server";
import { boreOf, sizeText, strokeOf } from "./sizes";
import { BUILD_STATUS_LABELS } from "./status";

// What the build sheet says beyond the readings: the engine's identity and the sign-off.
// Shared by the print view and the PDF so that both read alike.

export type SheetPaper = "a4" | "letter";
export const sheetSearch = z.object({ paper: optionalSearch(z.enum(["a4", "letter"])) });

type Build = BuildPage["build"];

export function sheetFacts(b: Build): { label: string; value: string }[] {
  return [
    { label: "Work order", value: b.number },
    { label: "Customer", value: b.customerName },
    { label: "Engine serial", value: b.engineSerial || "not recorded" },
    { label: "Status", value: BUILD_STATUS_LABELS[b.status] },
    { label: "Bore", value: sizeText(boreOf(b)) ?? "—" },
    { label: "Stroke", value: sizeText(strokeOf(b)) ?? "—" },
    { label: "Came in", value: b.receivedOn ? formatCalendarDay(b.receivedOn) : "—" },
    { label: "Lead builder", value: b.leadBuilderName ?? "—" },
  ];
}

/** Who signed what off, and when: each test record's inspector, and the build's finishing and delivery. */
export function sheetSignOff(page: BuildPage): string[] {
  const lines = page.records.map(
    (v) =>
      `${v.record.title}: ${v.filedBy ?? "a former member of staff"}, ${formatDay(v.record.createdAt)} (${v.procedure.title}, revision ${v.revision.number})`,
  );
  const b = page.build;
  if (b.finishedAt)
    lines.push(`Build finished ${formatDay(b.finishedAt)}${b.leadBuilderName ? `, lead builder ${b.leadBuilderName}` : ""}.`);
  if (b.deliveredAt) lines.push(`Delivered ${formatDay(b.deliveredAt)}.`);
  if (!lines.length) lines.push("Nothing signed off yet.");
  return lines;
}

/** One line for a calculator run on the sheet: the figure a customer looks for. */
export function calcSummary(c: BuildPage["calcs"][number]): string | null {
  if (!c.ok) return null;
  if (c.kind === "distortion") {
    const worst = Math.max(...c.result.levels.map((l) => l.outOfRound_mm));
    return `${c.label}: out-of-round up to ${worst.toFixed(4)} mm over ${c.result.levels.length} depth(s)`;
  }
  if (c.kind === "preload")
    return `${c.label}: ${c.result.torque_Nm.toFixed(0)} N·m gives a clamp load of ${(c.result.preload_N / 1000).toFixed(1)} kN (${c.calculator})`;
  const v = c.result.verdict;
  return `${c.label}: clearance ${c.result.clearance_mm.toFixed(4)} mm${v ? ` (${v === "within" ? "within its spec" : `${v} its spec`})` : ""}`;
}
