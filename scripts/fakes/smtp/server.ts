/**
 * A stand-in for the shop's mail provider: an SMTP server on loopback that keeps every
 * message it receives as a JSON file (the app's admin Outbox page and the tests read them).
 * An HTTP control port lets tests list messages (all, or those to one address: `?to=`) and
 * stop/start the SMTP listener to simulate an outage. The list is kept in memory as well, so
 * that a test polling for its message does not read every file of the run again each time.
 */
import { mkdir, readdir, readFile, writeFile } from "node:fs/promises";
import http from "node:http";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";

export type StoredMessage = {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  links: string[];
  /** Files the message carried (a build sheet's PDF), with their bytes in base64. */
  attachments: { filename: string; contentType: string; size: number; contentBase64: string }[];
};

export function extractLinks(text: string, html: string): string[] {
  const found = new Set<string>();
  for (const m of `${text}\n${html}`.matchAll(/https?:\/\/[^\s"'<>]+/g)) found.add(m[0].replace(/[).,;]+$/, ""));
  return [...found];
}

export async function listMessages(dir: string): Promise<StoredMessage[]> {
  let names: string[] = [];
  try {
    names = (await readdir(dir)).filter((n) => n.endsWith(".json"));
  } catch {
    return [];
  }
  // A file cut short (the fake killed while writing it) is left out rather than stopping the list.
  const read = async (n: string) => {
    try {
      return JSON.parse(await readFile(path.join(dir, n), "utf8")) as StoredMessage;
    } catch {
      return null;
    }
  };
  const msgs = (await Promise.all(names.map(read))).filter((m): m is StoredMessage => m !== null);
  return msgs.sort((a, b) => (a.receivedAt < b.receivedAt ? 1 : -1));
}

export async function startSmtpFake(opts: { smtpPort: number; controlPort?: number; dir: string; host?: string }) {
  const host = opts.host ?? "127.0.0.1";
  await mkdir(opts.dir, { recursive: true });
  let seq = 0;
  // Newest first, as listMessages gives them; read from the folder once, then kept up to date.
  const received: StoredMessage[] = await listMessages(opts.dir);

  const makeServer = () =>
    new SMTPServer({
      disabledCommands: ["STARTTLS"],
      authOptional: true,
      logger: false,
      onData(stream, session, callback) {
        simpleParser(stream)
          .then(async (parsed) => {
            const to = session.envelope.rcptTo.map((r) => r.address);
            const text = parsed.text ?? "";
            const html = typeof parsed.html === "string" ? parsed.html : "";
            const msg: StoredMessage = {
              id: randomUUID(),
              receivedAt: new Date().toISOString(),
              from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
              to,
              subject: parsed.subject ?? "",
              text,
              html,
              links: extractLinks(text, html),
              attachments: parsed.attachments.map((a) => ({
                filename: a.filename ?? "",
                contentType: a.contentType,
                size: a.size,
                contentBase64: a.content.toString("base64"),
              })),
            };
            const name = `${Date.now().toString().padStart(15, "0")}-${String(seq++).padStart(6, "0")}.json`;
            await writeFile(path.join(opts.dir, name), JSON.stringify(msg, null, 2));
            received.unshift(msg);
            callback();
          })
          .catch((err) => callback(err));
      },
    });

  let smtp: SMTPServer | null = null;
  const listen = () =>
    new Promise<void>((resolve, reject) => {
      if (smtp) return resolve();
      const s = makeServer();
      s.on("error", (e) => console.error("[smtp-fake]", e.message));
      s.listen(opts.smtpPort, host, () => {
        smtp = s;
        resolve();
      });
      s.server.once("error", reject);
    });
  const unlisten = () =>
    new Promise<void>((resolve) => {
      if (!smtp) return resolve();
      const s = smtp;
      smtp = null;
      s.close(() => resolve());
    });

  await listen();

  let control: http.Server | null = null;
  if (opts.controlPort != null) {
    control = http.createServer(async (req, res) => {
      const send = (status: number, body: unknown) => {
        res.writeHead(status, { "content-type": "application/json" });
        res.end(JSON.stringify(body));
      };
      try {
        const url = new URL(req.url ?? "/", "http://control");
        if (req.method === "GET" && url.pathname === "/messages") {
          const to = url.searchParams.get("to");
          return send(200, to === null ? received : received.filter((m) => m.to.includes(to)));
        }
        if (req.method === "POST" && url.pathname === "/smtp/stop") {
          await unlisten();
          return send(200, { listening: false });
        }
        if (req.method === "POST" && url.pathname === "/smtp/start") {
          await listen();
          return send(200, { listening: true });
        }
        if (req.method === "GET" && url.pathname === "/health") return send(200, { listening: Boolean(smtp) });
        send(404, { error: "not found" });
      } catch (err) {
        send(500, { error: String(err) });
      }
    });
    await new Promise<void>((r) => control!.listen(opts.controlPort, host, r));
  }

  return {
    smtpUrl: `smtp://${host}:${opts.smtpPort}`,
    controlUrl: opts.controlPort != null ? `http://${host}:${opts.controlPort}` : null,
    stopSmtp: unlisten,
    startSmtp: listen,
    async close() {
      await unlisten();
      await new Promise<void>((r) => (control ? control.close(() => r()) : r()));
    },
  };
}

// CLI: tsx scripts/fakes/smtp/server.ts --port 2525 --control 2526 --dir .data/mail
if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, fallback?: string) => {
    const i = process.argv.indexOf(`--${name}`);
    return i >= 0 ? process.argv[i + 1] : fallback;
  };
  const fake = await startSmtpFake({
    smtpPort: Number(arg("port", "2525")),
    controlPort: arg("control") ? Number(arg("control")) : undefined,
    dir: arg("dir", ".data/mail")!,
  });
  console.log(`[smtp-fake] listening on ${fake.smtpUrl}${fake.controlUrl ? `, control ${fake.controlUrl}` : ""}`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
}
