import { useEffect, useRef } from "react";
import { useFetcher } from "react-router";

/** The upload form's optional caption file, given with the video (sent once the recording exists). */
export function CaptionFileField({ id, file, onChange }: { id: string; file: File | null; onChange: (f: File | null) => void }) {
  return (
    <div className="md:col-span-2">
      <label className="label" htmlFor={`c-${id}`}>
        Captions <span className="font-normal text-graphite-soft">(optional: a WebVTT or SRT file of what is said)</span>
      </label>
      <input
        id={`c-${id}`}
        type="file"
        accept=".vtt,.srt,text/vtt,application/x-subrip"
        className="block w-full text-sm"
        onChange={(e) => onChange(e.currentTarget.files?.[0] ?? null)}
        data-testid="upload-captions"
      />
      {file && <p className="mt-1 text-xs text-graphite-soft">Attached to the recording when the upload is done.</p>}
    </div>
  );
}

type Answer = { cues?: number; reason?: string; issues?: { message: string }[] };

/**
 * Sends the caption file to the new recording once, and says how it went: a refused file is
 * listed with its reasons, and can be attached again from the recording's page.
 */
export function CaptionsSent({ recordingId, file }: { recordingId: string; file: File }) {
  const fetcher = useFetcher<Answer>({ key: `upload-captions-${recordingId}` });
  const sent = useRef(false);
  useEffect(() => {
    if (sent.current || fetcher.state !== "idle" || fetcher.data) return;
    sent.current = true;
    const form = new FormData();
    form.append("file", file);
    fetcher.submit(form, { method: "POST", action: `/api/recordings/${recordingId}/captions`, encType: "multipart/form-data" });
  }, [fetcher, file, recordingId]);
  if (fetcher.state !== "idle" || !fetcher.data) return <span className="text-graphite-soft">Attaching the captions…</span>;
  if (typeof fetcher.data.cues === "number") return <span className="text-ok">Captions attached ({fetcher.data.cues} lines)</span>;
  const problems = fetcher.data.issues?.map((i) => i.message) ?? [fetcher.data.reason ?? "The captions could not be attached."];
  return (
    <span className="text-spec-red" role="alert">
      The captions were not attached: {problems.slice(0, 3).join(" ")} Attach a corrected file on the recording's page.
    </span>
  );
}
