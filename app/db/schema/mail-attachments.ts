import { bigint, bigserial, customType, index, pgTable, text } from "drizzle-orm/pg-core";
import { mailOutbox } from "./auth";

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

/**
 * Files sent with an outbox message (a build sheet's PDF): written in the transaction that
 * queues the mail, read by the worker when it sends it, gone with the message.
 */
export const mailAttachments = pgTable(
  "mail_attachments",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    mailId: bigint("mail_id", { mode: "number" })
      .notNull()
      .references(() => mailOutbox.id, { onDelete: "cascade" }),
    filename: text("filename").notNull(),
    contentType: text("content_type").notNull(),
    content: bytea("content").notNull(),
  },
  (t) => [index("mail_attachments_mail_idx").on(t.mailId)],
);
