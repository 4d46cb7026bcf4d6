/** A moment in a video as the API takes it (seconds from the start), shared by marks and readings. Pure. */
import { z } from "zod";
import { formatTime } from "~/lib/time-format";

/** No video is longer than this (about 11 days); a larger time is a typing slip. */
const MAX_SECONDS = 1e6;

export const videoSeconds = z
  .number({ error: "Enter a time in seconds." })
  .finite("Enter a time in seconds.")
  .max(MAX_SECONDS, "That is later than any video runs.");

/** True when `t` is past the end of a video `durationS` long (an unknown length has none); a thousandth of slack for rounding. */
export const pastTheEnd = (t: number, durationS: number | null): boolean => durationS != null && t > durationS + 0.001;

export const tooLateMessage = (durationS: number) => `The video is only ${formatTime(durationS)} long.`;
