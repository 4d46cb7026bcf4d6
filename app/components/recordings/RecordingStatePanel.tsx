import { Form, Link } from "react-router";
import { formatBytes } from "~/lib/byte-format";
import { Poster } from "./Poster";

type StateRecording = {
  id: string;
  title: string;
  state: string;
  stateReason: string | null;
  progress: number;
  hasPoster: boolean;
  hasOriginal: boolean;
  originalName: string;
  originalSize: number;
};

/** What the watch page shows instead of the player while a recording is not ready: why, and what can be done. */
export function RecordingStatePanel({ recording: r, canRetry, busy }: { recording: StateRecording; canRetry: boolean; busy: boolean }) {
  return (
    <div className="grid gap-5 md:grid-cols-[20rem_1fr]">
      <Poster id={r.id} hasPoster={r.hasPoster} title={r.title} />
      <div className="card space-y-3">
        {r.state === "processing" && (
          <>
            <h2 className="text-lg">Processing</h2>
            <p className="text-sm text-graphite-soft">
              The server is checking the file, taking a poster frame and, if needed, making a copy every browser plays. This page updates by
              itself.
            </p>
            <div
              role="progressbar"
              aria-label="Processing"
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={Math.round(r.progress * 100)}
              className="h-2.5 overflow-hidden rounded-full bg-paper-deep"
            >
              <div className="h-full rounded-full bg-brass transition-all" style={{ width: `${Math.max(3, r.progress * 100)}%` }} />
            </div>
            {r.stateReason && <p className="text-sm text-graphite-soft">{r.stateReason}</p>}
          </>
        )}
        {r.state === "rejected" && (
          <>
            <h2 className="text-lg text-spec-red">Not a video</h2>
            <p className="text-sm" data-testid="state-reason">
              {r.stateReason}
            </p>
            <p className="text-sm text-graphite-soft">
              The file's bytes were removed. Check that you picked the right file, then <Link to="/recordings/upload">upload again</Link>.
            </p>
          </>
        )}
        {r.state === "damaged" && (
          <>
            <h2 className="text-lg text-spec-red">The video is damaged</h2>
            <p className="text-sm" data-testid="state-reason">
              {r.stateReason}
            </p>
          </>
        )}
        {r.state === "failed" && (
          <>
            <h2 className="text-lg text-spec-red">Processing failed</h2>
            <p className="text-sm" data-testid="state-reason">
              {r.stateReason}
            </p>
            {!canRetry && <p className="text-sm text-graphite-soft">An editor can retry it; the original file is kept.</p>}
          </>
        )}
        {canRetry && (r.state === "failed" || r.state === "processing") && r.hasOriginal && (
          <Form method="post">
            <input type="hidden" name="intent" value="retry" />
            <button type="submit" className="btn" disabled={busy}>
              {r.state === "failed" ? "Retry processing" : "Start processing again"}
            </button>
          </Form>
        )}
        <p className="num text-xs text-graphite-soft">
          {r.originalName} · {formatBytes(r.originalSize)}
        </p>
      </div>
    </div>
  );
}
