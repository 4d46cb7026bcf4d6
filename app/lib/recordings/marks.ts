/**
 * A mark: a moment or a span of a video with a note, tags and perhaps the procedure it shows.
 * The zod schemas of the JSON the API takes for one, checked against the video's length.
 * Pure: no Node built-ins, safe in the browser.
 */
import { z } from "zod";
import { buildNumberInput } from "~/lib/builds/attach-form";
import { tagsSchema } from "~/lib/tags";
import { pastTheEnd, tooLateMessage, videoSeconds } from "./video-time";

const markStart = videoSeconds.min(0, "A mark cannot be before the start of the video.");
const procedureId = z.string().uuid("Choose a procedure from the list.").nullable().optional();

export function markInputSchema(durationS: number | null) {
  return z
    .object({
      tStart: markStart,
      tEnd: videoSeconds.nullable().optional(),
      text: z.string().trim().min(1, "Write what happens at this moment.").max(2000, "Keep a mark under 2000 characters."),
      tags: tagsSchema,
      procedureId,
      buildNumber: buildNumberInput,
    })
    .superRefine((m, ctx) => {
      if (pastTheEnd(m.tStart, durationS)) ctx.addIssue({ code: "custom", path: ["tStart"], message: tooLateMessage(durationS!) });
      if (m.tEnd != null) {
        if (m.tEnd <= m.tStart) ctx.addIssue({ code: "custom", path: ["tEnd"], message: "A span must end after it starts." });
        else if (pastTheEnd(m.tEnd, durationS)) ctx.addIssue({ code: "custom", path: ["tEnd"], message: tooLateMessage(durationS!) });
      }
    });
}

export const markPatchSchema = (durationS: number | null) =>
  z
    .object({
      tStart: markStart.optional(),
      tEnd: videoSeconds.nullable().optional(),
      text: z.string().trim().min(1, "Write what happens at this moment.").max(2000).optional(),
      tags: tagsSchema.optional(),
      procedureId,
      buildNumber: buildNumberInput,
    })
    .superRefine((m, ctx) => {
      if (m.tStart != null && pastTheEnd(m.tStart, durationS))
        ctx.addIssue({ code: "custom", path: ["tStart"], message: tooLateMessage(durationS!) });
      if (m.tEnd != null && pastTheEnd(m.tEnd, durationS))
        ctx.addIssue({ code: "custom", path: ["tEnd"], message: tooLateMessage(durationS!) });
    });
