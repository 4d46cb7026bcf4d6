// A build's status words and the moves between them; pure, shared by server and screens.

export const BUILD_STATUSES = ["open", "on_bench", "finished", "delivered"] as const;
export type BuildStatus = (typeof BUILD_STATUSES)[number];

export const BUILD_STATUS_LABELS: Record<BuildStatus, string> = {
  open: "Open",
  on_bench: "On the bench",
  finished: "Finished",
  delivered: "Delivered",
};

/** Still in the shop: listed on the Shop floor. */
export const IN_PROGRESS: readonly BuildStatus[] = ["open", "on_bench", "finished"];

/** The next status forward, or null for a delivered build (which can only be reopened). */
export function nextStatus(s: BuildStatus): BuildStatus | null {
  const i = BUILD_STATUSES.indexOf(s);
  return i < BUILD_STATUSES.length - 1 ? BUILD_STATUSES[i + 1] : null;
}

/** Forward only; going back is a reopen, which needs a reason. */
export function canMoveTo(from: BuildStatus, to: BuildStatus): boolean {
  return BUILD_STATUSES.indexOf(to) > BUILD_STATUSES.indexOf(from);
}

/** Finished or Delivered builds are reopened (to On the bench) with a reason. */
export function canReopen(s: BuildStatus): boolean {
  return s === "finished" || s === "delivered";
}
