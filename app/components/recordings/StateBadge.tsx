type State = "processing" | "ready" | "rejected" | "failed" | "damaged";

const STYLE: Record<State, string> = {
  processing: "border-brass/50 bg-brass-soft text-[#6d4e15]",
  ready: "border-ok/40 bg-ok-soft text-ok",
  rejected: "border-spec-red/40 bg-spec-red-soft text-spec-red",
  failed: "border-spec-red/40 bg-spec-red-soft text-spec-red",
  damaged: "border-spec-red/40 bg-spec-red-soft text-spec-red",
};
const LABEL: Record<State, string> = {
  processing: "Processing",
  ready: "Ready",
  rejected: "Rejected",
  failed: "Failed",
  damaged: "Damaged",
};

export function StateBadge({ state, progress }: { state: State; progress?: number | null }) {
  return (
    <span
      data-testid="recording-state"
      data-state={state}
      className={`inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-xs font-semibold ${STYLE[state]}`}
    >
      {LABEL[state]}
      {state === "processing" && progress != null && progress > 0 && <span className="num">{Math.round(progress * 100)} %</span>}
    </span>
  );
}
