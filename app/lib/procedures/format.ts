/** Small formatting helpers with no dependencies (safe for any client bundle). */

export { formatSeconds } from "~/lib/time-format";
