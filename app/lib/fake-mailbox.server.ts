import { readdir, readFile } from "node:fs/promises";
import path from "node:path";

export type CapturedMessage = {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  links: string[];
};

/** Reads the messages the local SMTP stand-in stored (scripts/fakes/smtp), newest first. */
export async function readFakeMailbox(dir: string): Promise<CapturedMessage[]> {
  let names: string[];
  try {
    names = (await readdir(dir))
      .filter((n) => n.endsWith(".json"))
      .sort()
      .reverse();
  } catch {
    return [];
  }
  const out: CapturedMessage[] = [];
  for (const n of names.slice(0, 200)) {
    try {
      out.push(JSON.parse(await readFile(path.join(dir, n), "utf8")));
    } catch {
      /* a file being written right now */
    }
  }
  return out;
}
