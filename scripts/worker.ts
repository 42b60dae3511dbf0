/**
 * A standalone background worker (analysis jobs and the mail outbox) against the app's database:
 *
 *   npm run worker          (DATABASE_URL and the other settings as for npm start)
 *
 * Start as many as the load needs, on this machine or others that reach the database; the app's own process runs
 * one too (CYCLEGATE_WORKER=false turns that one off). Stops cleanly on SIGINT/SIGTERM; a worker killed mid-job has
 * its job retried by another after ANALYSIS_TIMEOUT_SECONDS.
 */
import { loadEnv } from "../lib/env";
import { startWorker } from "../lib/jobs/worker";

const env = loadEnv(process.env, { needSecret: false });
const worker = await startWorker({ env });
console.log(`worker started (pid ${process.pid})`);

let stopping = false;
const stop = () => {
  if (stopping) return;
  stopping = true;
  void worker.stop().then(
    () => process.exit(0),
    () => process.exit(1),
  );
  setTimeout(() => process.exit(1), 15_000).unref();
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
