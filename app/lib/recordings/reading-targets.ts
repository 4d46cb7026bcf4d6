/**
 * Which recordings take new readings. A reading is checked against its video (its time, what
 * the bench shows), so a recording whose video cannot be watched takes none: one refused as not
 * a video, or one whose video is damaged. The calculators' "Save as readings" is offered only
 * the others (GET /api/recordings?for=readings), and the API refuses the rest with the reason.
 * Pure, safe in the browser.
 */
import { DomainError } from "../domain-error";

export const STATES_WITHOUT_READINGS = ["rejected", "damaged"] as const;

const WHY_NOT: Record<(typeof STATES_WITHOUT_READINGS)[number], string> = {
  rejected: "This recording is not a video (its file was refused), so it takes no readings. Choose another recording.",
  damaged:
    "This recording's video is damaged, so readings on it could not be checked against it. Choose another recording, or upload the video again.",
};

const isWithout = (state: string): state is (typeof STATES_WITHOUT_READINGS)[number] =>
  (STATES_WITHOUT_READINGS as readonly string[]).includes(state);

/** Refuses new readings on a recording whose video cannot be watched (409, with the reason). */
export function assertTakesReadings(rec: { state: string }): void {
  if (isWithout(rec.state)) throw new DomainError(WHY_NOT[rec.state], { field: "recordingId", details: { state: rec.state } });
}
