import { useEffect, useRef } from "react";
import { useFetcher } from "react-router";
import { BuildOptions, type BuildPick } from "./BuildPicker";

/** The upload form's optional build: the engine the video shows ("No build" when none). */
export function BuildField({
  id,
  builds,
  value,
  onChange,
}: {
  id: string;
  builds: BuildPick[];
  value: string;
  onChange: (v: string) => void;
}) {
  return (
    <div>
      <label className="label" htmlFor={`b-${id}`}>
        Build <span className="font-normal text-graphite-soft">(optional)</span>
      </label>
      <select id={`b-${id}`} className="field" value={value} onChange={(e) => onChange(e.target.value)} data-testid="upload-build">
        <BuildOptions builds={builds} />
      </select>
    </div>
  );
}

type Answer = { recording?: { buildNumber: string | null }; reason?: string; issues?: { message: string }[] };

/**
 * Puts the new recording on the chosen build once it exists (PATCH /api/recordings/:id), and says
 * how it went; a refusal can be put right on the recording's page.
 */
export function BuildSent({ recordingId, buildNumber }: { recordingId: string; buildNumber: string }) {
  const fetcher = useFetcher<Answer>({ key: `upload-build-${recordingId}` });
  const sent = useRef(false);
  useEffect(() => {
    if (sent.current || fetcher.state !== "idle" || fetcher.data) return;
    sent.current = true;
    fetcher.submit({ buildNumber }, { method: "PATCH", action: `/api/recordings/${recordingId}`, encType: "application/json" });
  }, [fetcher, buildNumber, recordingId]);
  if (fetcher.state !== "idle" || !fetcher.data) return <span className="text-graphite-soft">Putting it on build {buildNumber}…</span>;
  if (fetcher.data.recording)
    return (
      <span className="text-ok" data-testid="upload-build-done">
        On build {buildNumber}
      </span>
    );
  const why = fetcher.data.issues?.[0]?.message ?? fetcher.data.reason ?? "It could not be put on the build.";
  return (
    <span className="text-spec-red" role="alert">
      Not on build {buildNumber}: {why} Choose the build on the recording's page.
    </span>
  );
}
