import { useCallback, useEffect, useRef, useState } from "react";
import { Link } from "react-router";
import type { Upload as TusUpload } from "tus-js-client";
import { StateBadge } from "./StateBadge";
import { CaptionFileField, CaptionsSent } from "./UploadCaptions";
import type { BuildPick } from "~/components/builds/BuildPicker";
import { BuildField, BuildSent } from "~/components/builds/UploadBuild";
import { formatBytes } from "~/lib/byte-format";
import { fileNameProblem, titleFromFileName } from "~/lib/recordings/upload-names";
import { fileFingerprint, fingerprintMetadata } from "~/lib/recordings/file-fingerprint";

type Status = "waiting" | "uploading" | "paused" | "retrying" | "done" | "error" | "cancelled";
type RecState = { state: "processing" | "ready" | "rejected" | "failed" | "damaged"; progress: number; stateReason: string | null };

/** An unfinished upload of the same file that the server holds for this person. */
type Earlier = { id: string; received: number; title: string; description: string; tags: string[] };

export type QueueItem = {
  key: string;
  file: File;
  title: string;
  description: string;
  tags: string;
  status: Status;
  sent: number;
  speed: number | null; // bytes/s, smoothed
  message: string | null;
  resumedFrom: number | null;
  /** The server's upload this item sends to (known once created, or found on the server). */
  uploadId: string | null;
  earlier: Earlier | null;
  /** Asking the server for an earlier upload of this file (Upload waits for the answer). */
  checking: boolean;
  recordingId: string | null;
  rec: RecState | null;
  /** An optional caption file, attached to the recording once it exists (issue 17). */
  captions?: File | null;
  /** An optional build (its number), the recording is put on once it exists (issue 16). */
  build?: string;
};

const CHUNK = 16 * 1024 * 1024;
const RETRY_DELAYS = [0, 1000, 3000, 5000, 10000, 20000, 30000, 60000, 60000, 60000];

function eta(item: QueueItem): string {
  if (!item.speed || item.speed <= 0) return "–";
  const s = (item.file.size - item.sent) / item.speed;
  if (s < 60) return `${Math.ceil(s)} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
  return `${Math.floor(s / 3600)} h ${Math.round((s % 3600) / 60)} min`;
}

function serverMessage(err: unknown): string {
  const e = err as { originalResponse?: { getStatus(): number; getBody(): string } | null; message?: string };
  const status = e.originalResponse?.getStatus();
  const body = e.originalResponse?.getBody()?.trim();
  if (status === 401) return "Your session has ended. Sign in again, then choose the same file to continue.";
  if (status === 403) {
    try {
      return (JSON.parse(body ?? "") as { reason?: string }).reason ?? "Your role cannot upload recordings.";
    } catch {
      return "Your role cannot upload recordings.";
    }
  }
  if (body && status && status < 500) return body;
  return "The connection to the shop server was lost and retries ran out. Press Resume to continue from where the server has it.";
}

/** Asks the server for an unfinished upload of this file (same name, size and fingerprint) by this person. */
async function findEarlier(file: File): Promise<Earlier | null> {
  try {
    const fp = await fileFingerprint(file);
    const res = await fetch(
      `/api/uploads?${new URLSearchParams({ fileName: file.name, size: String(file.size), ...(fp.sample ? { sample: fp.sample } : {}), lastModified: fp.lastModified })}`,
    );
    if (!res.ok) return null;
    const { unfinished } = (await res.json()) as { unfinished: Earlier[] };
    return unfinished[0] ?? null;
  } catch {
    return null;
  }
}

const uploadIdOf = (url: string | null) => (url ? (url.replace(/\/+$/, "").split("/").pop() ?? null) : null);

export function UploadQueue({
  maxBytes,
  onUploadsChange,
  builds = [],
  forBuild = "",
}: {
  maxBytes: number;
  onUploadsChange?: (uploadIds: string[]) => void;
  builds?: BuildPick[];
  /** The build new files are for unless changed (the upload page opened from a build's page). */
  forBuild?: string;
}) {
  const [items, setItems] = useState<QueueItem[]>([]);
  const uploads = useRef(new Map<string, TusUpload>());
  const [dragging, setDragging] = useState(false);
  const inputRef = useRef<HTMLInputElement>(null);

  const patch = useCallback((key: string, p: Partial<QueueItem> | ((i: QueueItem) => Partial<QueueItem>)) => {
    setItems((list) => list.map((i) => (i.key === key ? { ...i, ...(typeof p === "function" ? p(i) : p) } : i)));
  }, []);

  const add = useCallback(
    (files: FileList | File[]) => {
      const next: QueueItem[] = [];
      for (const file of Array.from(files)) {
        const problem = fileNameProblem(file.name);
        const tooBig =
          file.size > maxBytes
            ? `This file is ${formatBytes(file.size)}; the shop's limit is ${formatBytes(maxBytes)}. Nothing was sent.`
            : null;
        const empty = file.size === 0 ? "This file is empty (0 bytes); there is nothing to upload." : null;
        next.push({
          key: `${file.name}-${file.size}-${file.lastModified}-${Math.random().toString(36).slice(2, 7)}`,
          file,
          title: titleFromFileName(file.name),
          description: "",
          tags: "",
          status: problem || tooBig || empty ? "error" : "waiting",
          sent: 0,
          speed: null,
          message: problem ?? tooBig ?? empty,
          resumedFrom: null,
          uploadId: null,
          earlier: null,
          checking: !(problem || tooBig || empty),
          recordingId: null,
          rec: null,
          build: forBuild,
        });
      }
      setItems((list) => [...list, ...next]);
      // The server knows this person's unfinished uploads by file name, size and fingerprint,
      // whichever browser started them: such a file continues where the server has it, with the title,
      // description and tags given when it began.
      for (const item of next) {
        if (item.status !== "waiting") continue;
        void findEarlier(item.file).then((earlier) => {
          patch(item.key, (i) =>
            !earlier || i.status !== "waiting" || i.uploadId
              ? { checking: false }
              : {
                  checking: false,
                  earlier,
                  uploadId: earlier.id,
                  title: earlier.title,
                  description: earlier.description,
                  tags: earlier.tags.join(", "),
                  sent: earlier.received,
                  resumedFrom: earlier.received,
                },
          );
        });
      }
    },
    [maxBytes, patch, forBuild],
  );

  const start = useCallback(
    async (item: QueueItem) => {
      const tus = await import("tus-js-client");
      let upload = uploads.current.get(item.key);
      let lastAt = performance.now();
      let lastBytes = item.sent;
      if (!upload) {
        const fingerprint = fingerprintMetadata(await fileFingerprint(item.file));
        upload = new tus.Upload(item.file, {
          endpoint: "/api/uploads",
          chunkSize: CHUNK,
          retryDelays: RETRY_DELAYS,
          // Continuing is decided by the server (findEarlier), not by this browser's storage.
          storeFingerprintForResuming: false,
          ...(item.earlier ? { uploadUrl: `/api/uploads/${item.earlier.id}` } : {}),
          metadata: {
            filename: item.file.name,
            filetype: item.file.type || "application/octet-stream",
            title: item.title,
            description: item.description,
            tags: item.tags,
            ...fingerprint,
          },
          onShouldRetry: (err) => {
            const s = err.originalResponse?.getStatus() ?? 0;
            const retry = s === 0 || s === 409 || s === 423 || s >= 500;
            if (retry) patch(item.key, { status: "retrying", message: "Connection dropped; retrying from where the server has it…" });
            return retry;
          },
          onProgress: (sent, total) => {
            const now = performance.now();
            const dt = (now - lastAt) / 1000;
            patch(item.key, (i) => {
              let speed = i.speed;
              if (dt >= 0.5) {
                const inst = (sent - lastBytes) / dt;
                speed = speed == null ? inst : speed * 0.7 + inst * 0.3;
                lastAt = now;
                lastBytes = sent;
              }
              return {
                sent: Math.min(sent, total),
                speed,
                status: i.status === "retrying" ? "uploading" : i.status,
                message: i.status === "retrying" ? null : i.message,
              };
            });
          },
          onUploadUrlAvailable: () => patch(item.key, { uploadId: uploadIdOf(upload?.url ?? null) }),
          onAfterResponse: (_req, res) => {
            const id = res.getHeader("Benchreel-Recording");
            if (id) patch(item.key, { recordingId: id });
          },
          onSuccess: () =>
            patch(item.key, (i) => ({
              status: "done",
              sent: i.file.size,
              speed: null,
              message: null,
              rec: i.rec ?? { state: "processing", progress: 0, stateReason: null },
            })),
          onError: (err) => patch(item.key, { status: "error", speed: null, message: serverMessage(err) }),
        });
        uploads.current.set(item.key, upload);
      }
      patch(item.key, { status: "uploading", message: null });
      upload.start();
    },
    [patch],
  );

  const pause = useCallback(
    async (item: QueueItem) => {
      await uploads.current.get(item.key)?.abort();
      patch(item.key, { status: "paused", speed: null });
    },
    [patch],
  );

  const cancel = useCallback(
    async (item: QueueItem) => {
      const u = uploads.current.get(item.key);
      if (u) await u.abort(true).catch(() => undefined);
      uploads.current.delete(item.key);
      patch(item.key, { status: "cancelled", speed: null, message: "Cancelled; the partial upload was discarded." });
    },
    [patch],
  );

  // Tell the page which server uploads this queue is sending (they are not "unfinished" there)
  // whenever that changes or an upload ends, so its Unfinished panel follows without a reload.
  const onChangeRef = useRef(onUploadsChange);
  onChangeRef.current = onUploadsChange;
  const sending = items.filter((i) => i.uploadId && i.status !== "done" && i.status !== "cancelled").map((i) => i.uploadId!);
  const ended = items.filter((i) => i.status === "done" || i.status === "cancelled").length;
  const queueKey = `${sending.join(",")}|${ended}`;
  const lastKey = useRef(queueKey);
  useEffect(() => {
    if (lastKey.current === queueKey) return;
    lastKey.current = queueKey;
    onChangeRef.current?.(queueKey.split("|")[0].split(",").filter(Boolean));
  }, [queueKey]);

  // Watch the processing state of finished uploads.
  useEffect(() => {
    const watching = items.filter((i) => i.status === "done" && i.recordingId && (!i.rec || i.rec.state === "processing"));
    if (!watching.length) return;
    const t = setTimeout(async () => {
      for (const i of watching) {
        try {
          const res = await fetch(`/api/recordings/${i.recordingId}`);
          if (res.ok) {
            const { recording } = (await res.json()) as { recording: RecState };
            patch(i.key, { rec: { state: recording.state, progress: recording.progress, stateReason: recording.stateReason } });
          }
        } catch {
          /* try again on the next tick */
        }
      }
    }, 1200);
    return () => clearTimeout(t);
  }, [items, patch]);

  const waiting = items.filter((i) => i.status === "waiting" || i.status === "paused");

  return (
    <div className="space-y-5">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={(e) => {
          e.preventDefault();
          setDragging(false);
          if (e.dataTransfer.files.length) add(e.dataTransfer.files);
        }}
        className={`rounded-lg border-2 border-dashed px-6 py-8 text-center transition-colors ${dragging ? "border-brass bg-brass-soft/60" : "border-rule bg-card/70"}`}
      >
        <p className="font-serif text-lg">Drop video files here</p>
        <p className="mt-1 text-sm text-graphite-soft">
          MP4 or MOV straight from the phone, H.264 or HEVC, up to {formatBytes(maxBytes)} each. Uploads continue after a dropped
          connection; choose the same file again to pick up an interrupted one.
        </p>
        <button type="button" className="btn mt-4" onClick={() => inputRef.current?.click()}>
          Choose files…
        </button>
        <input
          ref={inputRef}
          type="file"
          multiple
          accept="video/*,.mov,.mp4,.m4v,.mkv"
          className="sr-only"
          data-testid="file-input"
          aria-label="Choose video files"
          onChange={(e) => {
            if (e.currentTarget.files?.length) add(e.currentTarget.files);
            e.currentTarget.value = "";
          }}
        />
      </div>

      {items.length > 0 && (
        <ul className="space-y-4" aria-label="Files to upload">
          {items.map((item) => (
            <UploadRow
              key={item.key}
              item={item}
              builds={builds}
              onChange={(p) => patch(item.key, p)}
              onStart={() => start(item)}
              onPause={() => pause(item)}
              onCancel={() => cancel(item)}
              onRemove={() => setItems((l) => l.filter((x) => x.key !== item.key))}
            />
          ))}
        </ul>
      )}
      {waiting.length > 1 && (
        <button type="button" className="btn btn-primary" onClick={() => waiting.forEach((i) => start(i))}>
          Upload all ({waiting.length})
        </button>
      )}
    </div>
  );
}

function UploadRow({
  item,
  builds,
  onChange,
  onStart,
  onPause,
  onCancel,
  onRemove,
}: {
  item: QueueItem;
  builds: BuildPick[];
  onChange: (p: Partial<QueueItem>) => void;
  onStart: () => void;
  onPause: () => void;
  onCancel: () => void;
  onRemove: () => void;
}) {
  const pct = item.file.size ? Math.floor((item.sent / item.file.size) * 100) : 0;
  // A file continuing an earlier upload keeps the details given when it began.
  const editable = item.status === "waiting" && !item.earlier;
  const active = item.status === "uploading" || item.status === "retrying";
  const id = item.key.replace(/[^A-Za-z0-9]/g, "");
  const blocked =
    item.status === "error" && item.sent === 0 && !item.recordingId && item.message && !item.message.startsWith("The connection");
  return (
    <li className="card space-y-3" data-testid="upload-item">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p className="min-w-0 break-all font-semibold">{item.file.name}</p>
        <p className="num text-sm text-graphite-soft">{formatBytes(item.file.size)}</p>
      </div>
      {editable ? (
        <div className="grid gap-3 md:grid-cols-[2fr_1fr]">
          <div>
            <label className="label" htmlFor={`t-${id}`}>
              Title
            </label>
            <input
              id={`t-${id}`}
              className="field"
              value={item.title}
              maxLength={200}
              onChange={(e) => onChange({ title: e.target.value })}
            />
          </div>
          <div>
            <label className="label" htmlFor={`g-${id}`}>
              Tags <span className="font-normal text-graphite-soft">(comma-separated)</span>
            </label>
            <input
              id={`g-${id}`}
              className="field"
              value={item.tags}
              placeholder="head studs, clamp load"
              onChange={(e) => onChange({ tags: e.target.value })}
            />
          </div>
          {builds.length > 0 && <BuildField id={id} builds={builds} value={item.build ?? ""} onChange={(build) => onChange({ build })} />}
          <div className="md:col-span-2">
            <label className="label" htmlFor={`d-${id}`}>
              Description <span className="font-normal text-graphite-soft">(optional)</span>
            </label>
            <textarea
              id={`d-${id}`}
              className="field min-h-16"
              value={item.description}
              maxLength={4000}
              onChange={(e) => onChange({ description: e.target.value })}
            />
          </div>
          <CaptionFileField id={id} file={item.captions ?? null} onChange={(captions) => onChange({ captions })} />
        </div>
      ) : (
        <p className="text-sm">
          <span className="font-semibold">{item.title}</span>
          {item.tags && <span className="text-graphite-soft"> · {item.tags}</span>}
        </p>
      )}

      {!blocked && item.status !== "cancelled" && item.status !== "waiting" && (
        <div>
          <div
            role="progressbar"
            aria-label={`Upload of ${item.file.name}`}
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={pct}
            data-testid="upload-progress"
            className="h-2.5 overflow-hidden rounded-full bg-paper-deep"
          >
            <div
              className={`h-full rounded-full ${item.status === "done" ? "bg-ok" : item.status === "error" ? "bg-spec-red" : "bg-brass"}`}
              style={{ width: `${pct}%` }}
            />
          </div>
          <p className="num mt-1.5 flex flex-wrap gap-x-4 text-sm text-graphite-soft">
            <span data-testid="upload-percent">{pct} %</span>
            <span>
              {formatBytes(item.sent)} of {formatBytes(item.file.size)}
            </span>
            {active && <span>{item.speed ? `${formatBytes(item.speed)}/s` : "measuring…"}</span>}
            {active && <span>{eta(item)} left</span>}
            {item.status === "paused" && <span>Paused</span>}
          </p>
        </div>
      )}

      {item.message && (
        <p
          role={item.status === "error" ? "alert" : "status"}
          className={`text-sm ${item.status === "error" ? "text-spec-red" : "text-graphite-soft"}`}
        >
          {item.message}
        </p>
      )}
      {item.resumedFrom != null && item.status !== "done" && (
        <p className="text-sm text-teal" data-testid="upload-continues">
          Continuing an earlier upload of this file ({formatBytes(item.resumedFrom)} of {formatBytes(item.file.size)} already on the
          server): only the rest is sent.
        </p>
      )}

      {item.status === "done" && (
        <div className="flex flex-wrap items-center gap-3 text-sm" data-testid="upload-done">
          <span className="font-semibold text-ok">Uploaded</span>
          {item.rec && <StateBadge state={item.rec.state} progress={item.rec.progress} />}
          {item.rec?.stateReason && (
            <span className={item.rec.state === "processing" ? "text-graphite-soft" : "text-spec-red"}>{item.rec.stateReason}</span>
          )}
          {item.recordingId && item.captions && <CaptionsSent recordingId={item.recordingId} file={item.captions} />}
          {item.recordingId && item.build && <BuildSent recordingId={item.recordingId} buildNumber={item.build} />}
          {item.recordingId && (
            <Link to={`/recordings/${item.recordingId}`} data-testid="open-recording">
              Open the recording
            </Link>
          )}
        </div>
      )}

      <div className="flex flex-wrap gap-2">
        {item.status === "waiting" && (
          <button type="button" className="btn btn-primary" onClick={onStart} disabled={!item.title.trim() || item.checking}>
            Upload
          </button>
        )}
        {active && (
          <button type="button" className="btn" onClick={onPause}>
            Pause
          </button>
        )}
        {(item.status === "paused" || (item.status === "error" && !blocked)) && (
          <button type="button" className="btn btn-primary" onClick={onStart}>
            Resume
          </button>
        )}
        {(active || item.status === "paused" || (item.status === "error" && !blocked)) && (
          <button type="button" className="btn btn-danger" onClick={onCancel}>
            Cancel upload
          </button>
        )}
        {(item.status === "waiting" || item.status === "cancelled" || blocked) && (
          <button type="button" className="btn" onClick={onRemove}>
            Remove from list
          </button>
        )}
      </div>
    </li>
  );
}
