import { useState } from "react";
import type { RunPhoto } from "~/lib/runs/runs.server";

type Shown = Pick<RunPhoto, "id" | "url"> & { takenByName?: string | null };

/**
 * A spec's photos (the gauge, the wrench's display) and the camera button. A photo goes up at
 * once; without a network it is not kept on the device (they are large): the person is told to
 * take it again when the network is back.
 */
export function RunPhotos({
  runId,
  specKey,
  specLabel,
  photos,
  canAdd,
}: {
  runId: string;
  specKey: string;
  specLabel: string;
  photos: Shown[];
  canAdd: boolean;
}) {
  const [added, setAdded] = useState<Shown[]>([]);
  const [state, setState] = useState<{ busy: boolean; message: string | null }>({ busy: false, message: null });
  const all = [...photos, ...added];
  const inputId = `photo-${specKey}`;

  async function upload(file: File) {
    setState({ busy: true, message: null });
    const body = new FormData();
    body.set("specKey", specKey);
    body.set("photo", file);
    try {
      const res = await fetch(`/api/runs/${runId}/photos`, { method: "POST", body });
      const out = (await res.json().catch(() => ({}))) as { id?: string; url?: string; reason?: string };
      if (res.ok && out.id && out.url) {
        const shown = { id: out.id, url: out.url };
        setAdded((a) => [...a, shown]);
        setState({ busy: false, message: "Photo kept with this entry." });
      } else setState({ busy: false, message: out.reason ?? "The photo was refused." });
    } catch {
      setState({ busy: false, message: "No network: the photo was not kept. Take it again when the network is back." });
    }
  }

  if (!all.length && !canAdd) return null;
  return (
    <div className="mt-3" data-testid="entry-photos">
      {all.length > 0 && (
        <ul className="mb-2 flex flex-wrap gap-2">
          {all.map((p, i) => (
            <li key={p.id}>
              <a href={p.url} target="_blank" rel="noreferrer">
                <img
                  src={p.url}
                  alt={`${specLabel}, shot ${i + 1} of ${all.length}`}
                  className="h-24 w-24 rounded border border-rule object-cover"
                  loading="lazy"
                />
              </a>
            </li>
          ))}
        </ul>
      )}
      {canAdd && (
        <>
          <label htmlFor={inputId} className="btn min-h-11 cursor-pointer">
            {state.busy ? "Sending the photo…" : "Add a photo"}
            <span className="sr-only"> for {specLabel}</span>
          </label>
          <input
            id={inputId}
            type="file"
            accept="image/*"
            capture="environment"
            className="sr-only"
            disabled={state.busy}
            onChange={(e) => {
              const f = e.target.files?.[0];
              e.target.value = "";
              if (f) void upload(f);
            }}
          />
          {state.message && (
            <p className="mt-1 text-sm text-graphite-soft" role="status">
              {state.message}
            </p>
          )}
        </>
      )}
    </div>
  );
}

/** A run's photos on the test record it filed (and the build's pages): spec by spec, each opening full size. */
export function RunPhotoGallery({
  photos,
  title = "Photos taken during the run",
}: {
  photos: Pick<RunPhoto, "id" | "url" | "specKey" | "specLabel" | "takenByName">[];
  title?: string;
}) {
  const bySpec = new Map<string, typeof photos>();
  for (const p of photos) bySpec.set(p.specLabel, [...(bySpec.get(p.specLabel) ?? []), p]);
  return (
    <section className="card" aria-labelledby="run-photos-h" data-testid="run-photos">
      <h2 id="run-photos-h" className="text-lg">
        {title}
      </h2>
      {[...bySpec].map(([label, list]) => (
        <div key={label} className="mt-2">
          <h3 className="text-sm font-semibold">{label}</h3>
          <ul className="mt-1 flex flex-wrap gap-2">
            {list.map((p, i) => (
              <li key={p.id}>
                <a href={p.url} target="_blank" rel="noreferrer">
                  <img
                    src={p.url}
                    alt={`${label}, shot ${i + 1} of ${list.length}${p.takenByName ? `, by ${p.takenByName}` : ""}`}
                    className="h-28 w-28 rounded border border-rule object-cover"
                    loading="lazy"
                  />
                </a>
              </li>
            ))}
          </ul>
        </div>
      ))}
    </section>
  );
}
