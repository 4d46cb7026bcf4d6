import { useEffect, useState } from "react";
import type { RunPhoto } from "~/lib/runs/runs.server";

type Shown = Pick<RunPhoto, "id" | "url" | "placeKey" | "where"> & { takenByName?: string | null };
type Waiting = { key: string; blob: Blob; position: unknown; refused?: string; specKey: string };

/** An object URL for a photo waiting on the device, revoked when it is no longer shown. */
function useObjectUrl(blob: Blob): string | null {
  const [url, setUrl] = useState<string | null>(null);
  useEffect(() => {
    const u = URL.createObjectURL(blob);
    setUrl(u);
    return () => URL.revokeObjectURL(u);
  }, [blob]);
  return url;
}

function WaitingPhoto({ photo, label, onDiscard }: { photo: Waiting; label: string; onDiscard?: (key: string) => void }) {
  const url = useObjectUrl(photo.blob);
  if (photo.refused)
    return (
      <li className="flex max-w-xs flex-col gap-1 text-sm" data-testid="photo-refused" role="alert">
        {url && <img src={url} alt={`${label}, refused by the server`} className="h-24 w-24 rounded border border-spec-red object-cover" />}
        <span className="field-error">{`Not kept: ${photo.refused}`}</span>
        <span className="text-graphite-soft">It is still on this tablet; sending it again will be refused again.</span>
        {onDiscard && (
          <button type="button" className="btn btn-danger min-h-11 self-start" onClick={() => onDiscard(photo.key)}>
            Discard from this tablet
          </button>
        )}
      </li>
    );
  return (
    <li className="flex flex-col items-center text-xs" data-testid="photo-waiting">
      {url && (
        <img
          src={url}
          alt={`${label}, waiting on this device`}
          className="h-24 w-24 rounded border border-dashed border-brass object-cover"
        />
      )}
      <span className="text-graphite-soft">waiting to send</span>
    </li>
  );
}

/**
 * A spec's photos (the gauge, the wrench's display) and the camera button. A photo is kept on
 * the device first (the run screen's queue, IndexedDB) and sent from there, so one taken
 * without a network waits and goes when it is back. For a spec measured per place, the photo
 * belongs to the place chosen beside the button (the one last typed at, to begin with).
 */
export function RunPhotos({
  specKey,
  specLabel,
  slots,
  defaultSlot,
  photos,
  waiting,
  canAdd,
  onPhoto,
  onDiscard,
}: {
  specKey: string;
  specLabel: string;
  /** The places a photo can belong to; one entry (the spec itself) for a spec measured once. */
  slots: { key: string; label: string }[];
  defaultSlot: string;
  photos: Shown[];
  waiting: Waiting[];
  canAdd: boolean;
  onPhoto: (slotKey: string, file: File) => void;
  /** Takes a refused photo off the device. */
  onDiscard?: (key: string) => void;
}) {
  const [chosen, setChosen] = useState<string | null>(null);
  const slot = chosen && slots.some((s) => s.key === chosen) ? chosen : defaultSlot;
  const inputId = `photo-${specKey}`;
  const perPlace = slots.length > 1 || slots[0]?.key !== specKey;
  const waitingLabel = (w: Waiting) => {
    const at = slots.find((s) => s.key === (w.position ? `${specKey}@${Object.entries(w.position as object)[0]?.join("")}` : specKey));
    return perPlace && at ? `${specLabel}, ${at.label}` : specLabel;
  };

  if (!photos.length && !waiting.length && !canAdd) return null;
  return (
    <div className="mt-3" data-testid="entry-photos">
      {(photos.length > 0 || waiting.length > 0) && (
        <ul className="mb-2 flex flex-wrap gap-2">
          {photos.map((p, i) => (
            <li key={p.id} className="flex flex-col items-center text-xs" data-testid="photo-sent">
              <a href={p.url} target="_blank" rel="noreferrer">
                <img
                  src={p.url}
                  alt={`${specLabel}${p.where ? `, ${p.where}` : ""}, shot ${i + 1} of ${photos.length}`}
                  className="h-24 w-24 rounded border border-rule object-cover"
                  loading="lazy"
                />
              </a>
              {p.where && <span className="num text-graphite-soft">{p.where}</span>}
            </li>
          ))}
          {waiting.map((w) => (
            <WaitingPhoto key={w.key} photo={w} label={waitingLabel(w)} onDiscard={onDiscard} />
          ))}
        </ul>
      )}
      {canAdd && (
        <div className="flex flex-wrap items-center gap-2">
          {perPlace && (
            <label className="flex items-center gap-2 text-sm">
              Photo of
              <select className="field min-h-11 w-auto" value={slot} onChange={(e) => setChosen(e.target.value)}>
                {slots.map((s) => (
                  <option key={s.key} value={s.key}>
                    {s.label}
                  </option>
                ))}
              </select>
            </label>
          )}
          <label htmlFor={inputId} className="btn min-h-11 cursor-pointer">
            Add a photo
            <span className="sr-only"> for {specLabel}</span>
          </label>
          <input
            id={inputId}
            type="file"
            accept="image/*"
            capture="environment"
            className="sr-only"
            onChange={(e) => {
              const f = e.target.files?.[0];
              e.target.value = "";
              if (f) onPhoto(slot, f);
            }}
          />
        </div>
      )}
    </div>
  );
}

/** A run's photos on the test record it filed (and the build's pages): spec by spec, each opening full size. */
export function RunPhotoGallery({
  photos,
  title = "Photos taken during the run",
}: {
  photos: Pick<RunPhoto, "id" | "url" | "specKey" | "specLabel" | "takenByName" | "where">[];
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
                    alt={`${label}${p.where ? `, ${p.where}` : ""}, shot ${i + 1} of ${list.length}${p.takenByName ? `, by ${p.takenByName}` : ""}`}
                    className="h-28 w-28 rounded border border-rule object-cover"
                    loading="lazy"
                  />
                </a>
                {p.where && <span className="num block text-center text-xs text-graphite-soft">{p.where}</span>}
              </li>
            ))}
          </ul>
        </div>
      ))}
    </section>
  );
}
