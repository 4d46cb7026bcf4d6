import { audit } from "~/lib/audit.server";
import { db } from "~/lib/db.server";
import { composeMail, enqueueMail } from "~/lib/mail.server";
import type { BuildWithLead } from "./builds.server";
import { addBuildEvent } from "./write.server";

/** The sheet's file name as the customer sees it: build-sheet-LEW-24-0117.pdf. */
export const sheetFileName = (number: string) => `build-sheet-${number}.pdf`;

/**
 * Queues the build sheet to the customer as a PDF attachment, through the outbox, and notes it
 * on the build's timeline, all in one transaction: a mail that is queued is always on record.
 */
export async function mailBuildSheet(actor: { id: string; name: string }, build: BuildWithLead, to: string, pdf: Buffer) {
  const file = sheetFileName(build.number);
  await db().transaction(async (tx) => {
    await enqueueMail(
      tx,
      composeMail({
        to,
        subject: `Build sheet for your engine, work order ${build.number}`,
        greeting: `Hello ${build.customerName},`,
        paragraphs: [
          `Attached is the build sheet for ${build.engine || "your engine"}${build.engineSerial ? `, serial ${build.engineSerial}` : ""}: what we measured, against which procedure revision, and who signed it off.`,
          "Keep it with the engine's papers. If you have a question about a figure on it, reply to this message and quote the work order.",
        ],
        footer: "Larkspur Engine Works",
      }),
      [{ filename: file, contentType: "application/pdf", content: pdf }],
    );
    await addBuildEvent(tx, build.id, actor.id, "sheet-mailed", { to, file, bytes: pdf.length });
    await audit(tx, actor.id, "mail-sheet", "build", build.id, { to, file });
  });
}
