// The outbox under load: a change that notifies many people queues one message each; the
// worker's lanes and two more senders (as other workers) drain it together, and every message
// is delivered exactly once.
import { randomUUID } from "node:crypto";
import { like } from "drizzle-orm";
import { expect, it } from "vitest";
import { mailOutbox } from "~/db/schema";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { createTransport, drainOutbox, enqueueMail } from "~/lib/mail.server";
import { mailbox, waitFor } from "../support/app";

it("delivers each of 60 queued messages once while the worker and two more senders drain the outbox at once", async () => {
  const batch = randomUUID().slice(0, 8);
  const addresses = Array.from({ length: 60 }, (_, i) => `lanes-${batch}-${i}@test.larkspur.example`);
  await db().transaction(async (tx) => {
    for (const to of addresses) await enqueueMail(tx, { to, subject: `Lanes ${batch}`, text: "A procedure waits for review.", html: "" });
  });
  // Two more senders beside the running worker, each with its lanes (as two more worker processes).
  const transport = createTransport(env().SMTP_URL);
  const drains = await Promise.all([drainOutbox({ transport, limit: 60 }), drainOutbox({ transport, limit: 60, lanes: 3 })]);
  expect(drains.every((d) => d.failed === 0)).toBe(true);
  const rows = await waitFor(async () => {
    const r = await db()
      .select()
      .from(mailOutbox)
      .where(like(mailOutbox.to, `lanes-${batch}-%`));
    return r.every((m) => m.sentAt !== null) ? r : null;
  }, 30_000);
  expect(rows).toHaveLength(60);
  expect(rows.every((m) => m.attempts === 1)).toBe(true);
  // The fake received each exactly once.
  for (const to of [addresses[0], addresses[29], addresses[59]]) expect(await mailbox(to)).toHaveLength(1);
  const received = (await mailbox()).filter((m) => m.subject === `Lanes ${batch}`);
  expect(received).toHaveLength(60);
  expect(new Set(received.flatMap((m) => m.to)).size).toBe(60);
}, 60_000);
