/**
 * The pipe between React's server renderer and the response. React hands a page over in pieces
 * of about 2 kB; passed on one by one, each piece is a read of the response stream, a call into
 * the compressor (a round trip to zlib's thread pool) and a socket write of its own, which cost
 * the read page more CPU than rendering its body did (docs/benchmarks.md). Pieces written in the
 * same turn of the event loop travel together instead: the shell in one piece, and each part
 * that streams in later (a Suspense boundary resolving) as soon as it is written.
 */
import { Transform } from "node:stream";

export function pageStream(onEnd: () => void): Transform {
  let pending: Buffer[] = [];
  let scheduled = false;
  const stream = new Transform({
    transform(chunk: Buffer, _encoding, callback) {
      pending.push(chunk);
      if (!scheduled) {
        scheduled = true;
        setImmediate(send);
      }
      callback();
    },
    flush(callback) {
      send();
      onEnd();
      callback();
    },
  });
  function send() {
    scheduled = false;
    if (!pending.length) return;
    const piece = pending.length === 1 ? pending[0] : Buffer.concat(pending);
    pending = [];
    stream.push(piece);
  }
  return stream;
}
