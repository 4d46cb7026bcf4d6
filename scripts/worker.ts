// The background worker started by `npm start` and `npm test`: drains the e-mail outbox and
// runs the other background jobs registered in app/lib/jobs.server.ts.
import { startWorker } from "../app/lib/jobs.server";
import { killChildren } from "../app/lib/recordings/processing.server";

// A stopping worker takes its ffmpeg with it (a killed one too: see killChildren's module).
process.on("exit", killChildren);

const worker = await startWorker();
console.log("[worker] running");
const stop = async () => {
  await worker.stop();
  process.exit(0);
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
