import { Link } from "react-router";
import type { BuildStatus } from "~/lib/builds/status";

/** A build as the pickers list it (buildChoices of app/lib/builds/builds.server.ts). */
export type BuildPick = { id: string; number: string; label: string; status: BuildStatus };

// Builds still being worked on come first: that is where a new recording or mark belongs.
const GROUPS: { label: string; has: readonly BuildStatus[] }[] = [
  { label: "In progress", has: ["on_bench", "open"] },
  { label: "Finished", has: ["finished"] },
  { label: "Delivered", has: ["delivered"] },
];

/**
 * The options of a build <select>: "No build" first, then the builds by where they stand, each
 * as number · customer · engine (a select's own type-ahead finds a number by its first letters).
 * `keep` is a number the thing is on that the list lacks, kept in view.
 */
export function BuildOptions({ builds, none = "No build", keep }: { builds: BuildPick[]; none?: string; keep?: string | null }) {
  return (
    <>
      <option value="">{none}</option>
      {keep && !builds.some((b) => b.number === keep) && <option value={keep}>{keep}</option>}
      {GROUPS.map((g) => {
        const list = builds
          .filter((b) => g.has.includes(b.status))
          .sort((a, b) => g.has.indexOf(a.status) - g.has.indexOf(b.status) || a.number.localeCompare(b.number));
        return list.length ? (
          <optgroup key={g.label} label={g.label}>
            {list.map((b) => (
              <option key={b.id} value={b.number}>
                {b.label}
              </option>
            ))}
          </optgroup>
        ) : null;
      })}
    </>
  );
}

/** "Build LEW-24-0119" as a link to the build's page, or the words for none. */
export function BuildLink({ number, none = "No build" }: { number: string | null; none?: string }) {
  if (!number) return <span className="text-graphite-soft">{none}</span>;
  return (
    <Link to={`/builds/${number}`} className="num font-semibold" data-testid="build-link">
      Build {number}
    </Link>
  );
}
