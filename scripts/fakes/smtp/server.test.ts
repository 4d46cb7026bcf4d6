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

  it("finds links in text and html and trims punctuation", () => {
    expect(extractLinks("See http://h/a/b.", '<a href="https://h/c?d=1">')).toEqual(["http://h/a/b", "https://h/c?d=1"]);
  });
});
