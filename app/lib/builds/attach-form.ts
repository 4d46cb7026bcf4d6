import { z } from "zod";
import { optionalSearch, uuid } from "~/lib/edge";
import { workOrderNumber } from "./form";

// What attaching a recording or a mark to a build takes at the edge (issue 16). Pure: shared by
// the server and the screens.

/**
 * A build number where a recording's or a mark's details are given (the JSON API, the mark
 * form): the number in any case, or null / "" for no build. Absent means "as it is"; for a new
 * mark, its recording's build.
 */
export const buildNumberInput = z.union([z.null(), z.literal("").transform(() => null), workOrderNumber]).optional();

/** PATCH /api/recordings/:id: the recording's build by number, or null to take it off its build. */
export const recordingBuildPatch = z.object({
  buildNumber: z.union([z.null(), z.literal("").transform(() => null), workOrderNumber], {
    error: "Give the build's number (LEW-24-0117), or null for no build.",
  }),
});

/** The same in a page's form, where "" (the "No build" option) is no build. */
export const buildNumberField = z.object({ buildNumber: z.union([z.literal("").transform(() => null), workOrderNumber]).default("") });

/** The upload page's `?build=LEW-24-0119`: the build its files are for, chosen beforehand (from the build page). */
export const uploadSearch = z.object({ build: optionalSearch(workOrderNumber) });

/** The build page's "Attach a recording" and its Detach buttons. */
export const attachRecordingSchema = z.object({ recordingId: z.string().min(1, { message: "Choose a recording to attach." }).pipe(uuid) });
export const detachRecordingSchema = z.object({ recordingId: uuid });
export const detachMarkSchema = z.object({ markId: uuid });
