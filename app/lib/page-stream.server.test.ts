// The page pipe of app/entry.server.tsx: what React writes in one turn of the event loop comes
// out as one piece, later writes come out later (streaming still streams), nothing is lost or
// reordered, and the end is reported once.
import { setImmediate as nextTurn } from "node:timers/promises";
import { describe, expect, it } from "vitest";
import { pageStream } from "./page-stream.server";

function collect(stream: NodeJS.ReadableStream) {
  const pieces: string[] = [];
  stream.on("data", (d: Buffer) => pieces.push(d.toString("utf8")));
  return pieces;
}

describe("pageStream", () => {
  it("joins the pieces written in one turn and keeps their order", async () => {
    let ended = 0;
    const s = pageStream(() => ended++);
    const pieces = collect(s);
    for (let i = 0; i < 25; i++) s.write(Buffer.from(`<p>${i}</p>`));
    await nextTurn();
    await nextTurn();
    expect(pieces).toEqual([Array.from({ length: 25 }, (_, i) => `<p>${i}</p>`).join("")]);
    expect(ended).toBe(0);
  });

  it("sends a later write as its own piece, and what is left at the end", async () => {
    let ended = 0;
    const s = pageStream(() => ended++);
    const pieces = collect(s);
    s.write(Buffer.from("<html>shell"));
    await nextTurn();
    await nextTurn();
    s.write(Buffer.from("<template>late</template>"));
    s.end(Buffer.from("</html>"));
    await new Promise((r) => s.on("end", r));
    expect(pieces).toEqual(["<html>shell", "<template>late</template></html>"]);
    expect(ended).toBe(1);
  });
});
