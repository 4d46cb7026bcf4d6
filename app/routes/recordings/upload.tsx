import { useCallback, useState } from "react";
import { Link, useFetcher, useRevalidator } from "react-router";
import type { Route } from "./+types/upload";
import { readForm } from "~/lib/edge.server";
import { FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { UploadQueue } from "~/components/recordings/UploadQueue";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { env } from "~/lib/env.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { unfinishedUploads, uploadExpiryDays } from "~/lib/recordings/tus.server";
import { discardUnfinishedUpload } from "~/lib/recordings/uploads.server";
import { formatBytes } from "~/lib/byte-format";
import { formatDayMonthTime } from "~/lib/dates";
import { buildChoices } from "~/lib/builds/builds.server";
import { uploadSearch } from "~/lib/builds/attach-form";
import { parseSearch } from "~/lib/edge.server";
import { can } from "~/lib/permissions";

export const meta: Route.MetaFunction = () => [{ title: "Upload videos · Recordings · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "recording:upload");
  const unfinished = await unfinishedUploads(user.id);
  const { build } = parseSearch(request, uploadSearch);
  const builds = can(user.role, "builds:read") ? await buildChoices() : [];
  // Coming from a build's page, its files are for that build unless changed.
  const forBuild = builds.find((b) => b.number === build)?.number ?? "";
  return { maxBytes: env().MAX_UPLOAD_BYTES, unfinished, expiryDays: uploadExpiryDays(), builds, forBuild };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "recording:upload");
  const form = await readForm(request);
  const intent = form.get("intent");
  const id = String(form.get("uploadId") ?? "");
  if (intent !== "discard" || !id) return unknownAction(request, intent);
  try {
    const { fileName } = await discardUnfinishedUpload(user, id);
    return redirectWithFlash("/recordings/upload", { kind: "ok", message: `Discarded the partial upload of ${fileName}.` });
  } catch (err) {
    return domainFailure(request, err, "discard");
  }
}

const fmt = formatDayMonthTime;

export default function UploadPage({ loaderData, actionData }: Route.ComponentProps) {
  const discard = useFetcher<typeof action>();
  // A refused discard (gone, or someone else's): from the fetcher, or from the page's own post without JavaScript.
  const refused = discard.state === "idle" ? (discard.data ?? actionData)?.errors?.form : undefined;
  // The panel follows the queue: an upload being sent from this page is not "unfinished"
  // here, and one that finishes or is cancelled leaves the panel without a reload.
  const [inQueue, setInQueue] = useState<string[]>([]);
  const { revalidate } = useRevalidator();
  const onUploadsChange = useCallback(
    (ids: string[]) => {
      setInQueue(ids);
      void revalidate();
    },
    [revalidate],
  );
  const unfinished = loaderData.unfinished.filter((u) => !inQueue.includes(u.id));
  return (
    <>
      <PageHeader
        title="Upload videos"
        kicker="Recordings"
        actions={
          <Link to="/recordings" className="btn no-underline">
            Back to recordings
          </Link>
        }
      />
      <div className="grid gap-6 lg:grid-cols-[1fr_18rem]">
        <UploadQueue
          maxBytes={loaderData.maxBytes}
          onUploadsChange={onUploadsChange}
          builds={loaderData.builds}
          forBuild={loaderData.forBuild}
        />
        <aside className="space-y-4">
          <section className="card text-sm">
            <h2 className="text-lg">After the upload</h2>
            <p className="mt-2 text-graphite-soft">
              The shop server checks that the file really is a video, grabs a poster frame and, for HEVC or QuickTime files, makes a copy
              every browser can play. The original is kept for download.
            </p>
          </section>
          <section className="card text-sm" aria-labelledby="unfinished-h">
            <h2 id="unfinished-h" className="text-lg">
              Unfinished uploads
            </h2>
            <p className="mt-1 text-xs text-graphite-soft">
              A partial upload that receives no bytes for {loaderData.expiryDays} days is discarded.
            </p>
            {refused && (
              <div className="mt-2">
                <FormError message={refused} />
              </div>
            )}
            {unfinished.length === 0 ? (
              <p className="mt-2 text-graphite-soft">
                None. An upload interrupted by a reload or a closed browser shows here until you finish or discard it.
              </p>
            ) : (
              <ul className="mt-2 space-y-3" data-testid="unfinished-uploads">
                {unfinished.map((u) => (
                  <li key={u.id}>
                    <p className="break-all font-semibold">{u.fileName}</p>
                    <p className="num text-graphite-soft">
                      {formatBytes(u.received)} of {formatBytes(u.size)} on the server · started {fmt(u.createdAt)}
                    </p>
                    <p className="text-graphite-soft">
                      Choose the same file above to continue, in any browser. Discarded by itself on {fmt(u.expiresAt)} if no more bytes
                      arrive.
                    </p>
                    <discard.Form method="post" className="mt-1">
                      <input type="hidden" name="intent" value="discard" />
                      <input type="hidden" name="uploadId" value={u.id} />
                      <button type="submit" className="btn btn-danger py-1 text-xs">
                        Discard
                      </button>
                    </discard.Form>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </aside>
      </div>
    </>
  );
}
