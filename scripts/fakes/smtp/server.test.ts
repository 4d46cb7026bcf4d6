import { mkdtemp, rm } from "node:fs/promises";
import { createServer } from "node:net";
import os from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { extractLinks, listMessages, startSmtpFake } from "./server";

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer();
    s.listen(0, "127.0.0.1", () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

describe("fake SMTP server", () => {
  let dir: string;
  let fake: Awaited<ReturnType<typeof startSmtpFake>>;
  let port: number;
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), "smtp-fake-"));
    port = await freePort();
    fake = await startSmtpFake({ smtpPort: port, controlPort: await freePort(), dir });
  });
  afterAll(async () => {
    await fake.close();
    await rm(dir, { recursive: true, force: true });
  });

  const transport = () => nodemailer.createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true });

  it("stores a message sent by nodemailer with text, html and links", async () => {
    await transport().sendMail({
      from: "benchreel@larkspur.example",
      to: "jamie@larkspur.example",
      subject: "Your invitation",
      text: "Open http://127.0.0.1:3000/invite/abc to join.",
      html: '<p><a href="http://127.0.0.1:3000/invite/abc">join</a></p>',
    });
    const msgs = await listMessages(dir);
    expect(msgs).toHaveLength(1);
    expect(msgs[0].to).toEqual(["jamie@larkspur.example"]);
    expect(msgs[0].subject).toBe("Your invitation");
    expect(msgs[0].html).toContain("<a href=");
    expect(msgs[0].links).toEqual(["http://127.0.0.1:3000/invite/abc"]);
    const viaHttp = await (await fetch(`${fake.controlUrl}/messages`)).json();
    expect(viaHttp[0].id).toBe(msgs[0].id);
  });

  it("refuses connections while stopped and accepts again after start", async () => {
    await fetch(`${fake.controlUrl}/smtp/stop`, { method: "POST" });
    await expect(transport().sendMail({ from: "a@larkspur.example", to: "b@larkspur.example", subject: "x", text: "x" })).rejects.toThrow(
      /ECONNREFUSED/,
    );
    await fetch(`${fake.controlUrl}/smtp/start`, { method: "POST" });
    await transport().sendMail({ from: "a@larkspur.example", to: "b@larkspur.example", subject: "back", text: "x" });
    expect((await listMessages(dir)).map((m) => m.subject)).toContain("back");
  });

  it("lists the messages to one address, newest first, and keeps those of an earlier start", async () => {
    await transport().sendMail({ from: "a@larkspur.example", to: "kit@larkspur.example", subject: "first", text: "x" });
    await transport().sendMail({ from: "a@larkspur.example", to: "other@larkspur.example", subject: "not kit's", text: "x" });
    await transport().sendMail({ from: "a@larkspur.example", to: "kit@larkspur.example", subject: "second", text: "x" });
    const kits = async (url: string | null) =>
      ((await (await fetch(`${url}/messages?to=${encodeURIComponent("kit@larkspur.example")}`)).json()) as { subject: string }[]).map(
        (m) => m.subject,
      );
    expect(await kits(fake.controlUrl)).toEqual(["second", "first"]);
    // a fake started again on the same folder lists what the first one received
    const again = await startSmtpFake({ smtpPort: await freePort(), controlPort: await freePort(), dir });
    try {
      expect(await kits(again.controlUrl)).toEqual(["second", "first"]);
      expect(((await (await fetch(`${again.controlUrl}/messages`)).json()) as unknown[]).length).toBe((await listMessages(dir)).length);
    } finally {
      await again.close();
    }
  });

  it("finds links in text and html and trims punctuation", () => {
    expect(extractLinks("See http://h/a/b.", '<a href="https://h/c?d=1">')).toEqual(["http://h/a/b", "https://h/c?d=1"]);
  });
});
