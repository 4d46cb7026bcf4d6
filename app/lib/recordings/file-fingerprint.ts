/**
 * What tells two files apart when they share a name, a size and an owner: the file's
 * lastModified and a SHA-256 of its first and last MiB ("sample"). The browser sends both in
 * the tus metadata when an upload begins and with the question "is there an unfinished upload
 * of this file?"; the server joins an upload only when they agree (`sameFile`). The sample
 * needs Web Crypto, which a browser offers only in a secure context (https or localhost);
 * without it the lastModified alone decides.
 */
export type FileFingerprint = { lastModified: string; sample: string | null };

const MIB = 1024 * 1024;
const known = new WeakMap<Blob, Promise<FileFingerprint>>();

async function sampleOf(file: Blob): Promise<string | null> {
  const subtle = globalThis.crypto?.subtle;
  if (!subtle) return null;
  const parts = file.size <= 2 * MIB ? [file] : [file.slice(0, MIB), file.slice(file.size - MIB)];
  const bytes = new Uint8Array(await new Blob(parts).arrayBuffer());
  const digest = new Uint8Array(await subtle.digest("SHA-256", bytes));
  return Array.from(digest, (b) => b.toString(16).padStart(2, "0")).join("");
}

/** The fingerprint of a file, computed once per File object. */
export function fileFingerprint(file: Blob & { lastModified: number }): Promise<FileFingerprint> {
  let p = known.get(file);
  if (!p) {
    p = sampleOf(file).then(
      (sample) => ({ lastModified: String(file.lastModified), sample }),
      () => ({ lastModified: String(file.lastModified), sample: null }),
    );
    known.set(file, p);
  }
  return p;
}

/** The tus metadata keys the fingerprint travels in. */
export function fingerprintMetadata(f: FileFingerprint): Record<string, string> {
  return f.sample ? { lastmodified: f.lastModified, sample: f.sample } : { lastmodified: f.lastModified };
}

/**
 * Whether an unfinished upload holds the same file as the one asked about: the samples agree
 * when both sides have one, otherwise the lastModified times do. Neither known: not the same
 * (name and size alone join different files).
 */
export function sameFile(stored: Partial<FileFingerprint>, asked: Partial<FileFingerprint>): boolean {
  if (stored.sample && asked.sample) return stored.sample === asked.sample;
  return Boolean(stored.lastModified && asked.lastModified && stored.lastModified === asked.lastModified);
}
