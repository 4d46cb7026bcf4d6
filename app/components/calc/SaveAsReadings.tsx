import { useEffect, useState } from "react";
import { Link } from "react-router";
import { fromSI, unitLabel, type UnitCode } from "~/lib/calc";

type RecordingOption = { id: string; title: string; state: string };

/**
 * "Save as readings": the bench points typed into the Preload calculator become torque and
 * clamp-load readings on a recording, paired by label and pass, so the recording's own
 * nut-factor chart shows the same fit. Goes through the recordings' JSON API.
 */
export function SaveAsReadings({
  points,
  torqueUnit,
  forceUnit,
  lube,
}: {
  points: { torque_Nm: number; preload_N: number }[];
  torqueUnit: string;
  forceUnit: string;
  lube: string;
}) {
  const [open, setOpen] = useState(false);
  const [recordings, setRecordings] = useState<RecordingOption[] | null>(null);
  const [recordingId, setRecordingId] = useState("");
  const [label, setLabel] = useState("bench point");
  const [pass, setPass] = useState("bench");
  const [stud, setStud] = useState("");
  const [lubeText, setLube] = useState(lube);
  const [state, setState] = useState<
    { kind: "idle" | "saving" } | { kind: "saved"; n: number; id: string; title: string } | { kind: "error"; message: string }
  >({ kind: "idle" });

  useEffect(() => {
    if (!open || recordings) return;
    // Only the recordings that take readings (not a damaged video, not a refused file).
    fetch("/api/recordings?sort=newest&for=readings", { headers: { accept: "application/json" } })
      .then((r) => (r.ok ? r.json() : Promise.reject(new Error(`the recordings list answered ${r.status}`))))
      .then((b: { recordings: RecordingOption[] }) => {
        const usable = b.recordings;
        setRecordings(usable);
        if (usable[0]) setRecordingId(usable[0].id);
      })
      .catch((err: Error) => setState({ kind: "error", message: `Could not load the recordings: ${err.message}.` }));
  }, [open, recordings]);

  if (!points.length) return null;
  const conv = (v: number, u: string) => Number(fromSI(v, u as UnitCode).toPrecision(6));

  async function save() {
    setState({ kind: "saving" });
    const conditions = { pass, ...(lubeText ? { lube: lubeText } : {}) };
    // The stud on the fixture goes in the readings' position field; a number the API refuses
    // (not a whole number 1–200) comes back as its field error.
    const fastener = stud.trim() === "" ? null : Number.isFinite(Number(stud)) ? Number(stud) : stud;
    const readings = points.flatMap((p, i) => [
      { quantity: "torque", value: conv(p.torque_Nm, torqueUnit), unit: torqueUnit, label: `${label} ${i + 1}`, fastener, conditions },
      { quantity: "clamp-load", value: conv(p.preload_N, forceUnit), unit: forceUnit, label: `${label} ${i + 1}`, fastener, conditions },
    ]);
    try {
      const res = await fetch(`/api/recordings/${recordingId}/readings`, {
        method: "POST",
        headers: { "content-type": "application/json", accept: "application/json" },
        body: JSON.stringify({ readings }),
      });
      const body = await res.json().catch(() => ({}));
      if (res.status === 201) {
        const title = recordings?.find((r) => r.id === recordingId)?.title ?? "the recording";
        setState({ kind: "saved", n: readings.length, id: recordingId, title });
      } else {
        const first = body?.issues?.[0];
        setState({ kind: "error", message: first ? first.message : (body?.reason ?? body?.error ?? `The server answered ${res.status}.`) });
      }
    } catch {
      setState({ kind: "error", message: "The server could not be reached; nothing was saved. Try again." });
    }
  }

  if (!open) {
    return (
      <button type="button" className="btn" onClick={() => setOpen(true)} data-testid="save-readings-open">
        Save as readings on a recording…
      </button>
    );
  }
  return (
    <section className="rounded-md border border-rule bg-paper/60 p-3 text-sm" aria-label="Save as readings" data-testid="save-readings">
      <p className="mb-2 text-graphite-soft">
        Each bench point becomes a torque reading ({unitLabel(torqueUnit as UnitCode)}) and a clamp-load reading (
        {unitLabel(forceUnit as UnitCode)}) with the same label, stud and pass.
      </p>
      {recordings && recordings.length === 0 && <p>No recordings yet. Upload the bench-test video first.</p>}
      {recordings && recordings.length > 0 && (
        <div className="grid gap-2 sm:grid-cols-2">
          <label className="sm:col-span-2">
            <span className="label">Recording</span>
            <select className="field" value={recordingId} onChange={(e) => setRecordingId(e.target.value)}>
              {recordings.map((r) => (
                <option key={r.id} value={r.id}>
                  {r.title}
                </option>
              ))}
            </select>
          </label>
          <label>
            <span className="label">Label (numbered)</span>
            <input className="field" value={label} onChange={(e) => setLabel(e.target.value)} maxLength={100} />
          </label>
          <label>
            <span className="label">Pass</span>
            <input className="field" value={pass} onChange={(e) => setPass(e.target.value)} maxLength={40} />
          </label>
          <label>
            <span className="label">Stud no. on the fixture (optional)</span>
            <input
              className="field"
              inputMode="numeric"
              value={stud}
              onChange={(e) => setStud(e.target.value)}
              maxLength={4}
              placeholder="4"
            />
          </label>
          <label>
            <span className="label">Lube</span>
            <input className="field" value={lubeText} onChange={(e) => setLube(e.target.value)} maxLength={80} />
          </label>
          <div className="flex flex-wrap items-center gap-2 sm:col-span-2">
            <button type="button" className="btn btn-primary" disabled={!recordingId || state.kind === "saving"} onClick={save}>
              {state.kind === "saving" ? "Saving…" : `Save ${points.length * 2} readings`}
            </button>
            <button type="button" className="btn" onClick={() => setOpen(false)}>
              Close
            </button>
          </div>
        </div>
      )}
      {state.kind === "saved" && (
        <p role="status" className="mt-2 font-semibold text-ok" data-testid="save-readings-done">
          Saved {state.n} readings to <Link to={`/recordings/${state.id}`}>{state.title}</Link>.
        </p>
      )}
      {state.kind === "error" && (
        <p role="alert" className="mt-2 text-spec-red">
          {state.message}
        </p>
      )}
    </section>
  );
}
