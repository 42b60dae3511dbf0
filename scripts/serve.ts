/**
 * Serves the app: `next start` (or `next dev` with --dev) behind a plain node:http server that drops
 * forwarding headers sent by the client. Next then fills X-Forwarded-For from the socket itself, so
 * the address used for sign-in throttling and the audit record cannot be forged. Behind a reverse
 * proxy of the shop's own, set TRUST_PROXY=true to keep the headers that proxy adds.
 *
 * The same process also runs the background worker (analysis jobs, mail outbox; lib/jobs/worker.ts) unless
 * CYCLEGATE_WORKER=false; `npm run worker` starts more of them against the same database.
 */
import { createServer } from "node:http";
import path from "node:path";
import next from "next";
import { loadEnv } from "../lib/env";
import { startWorker, type RunningWorker } from "../lib/jobs/worker";

const FORWARDING_HEADERS = ["x-forwarded-for", "x-forwarded-host", "x-forwarded-port", "x-forwarded-proto", "x-real-ip", "forwarded"];

const dev = process.argv.includes("--dev");
const env = loadEnv();
const hostname = process.env.CYCLEGATE_HOST || "127.0.0.1";
const app = next({ dev, dir: path.resolve(import.meta.dirname, ".."), hostname, port: env.port });
const handle = app.getRequestHandler();

await app.prepare();
let worker: RunningWorker | null = null;
if (env.inProcessWorker) {
  worker = await startWorker({ env, inAppProcess: true });
  console.log("background worker running in this process (analysis jobs, mail)");
}
const server = createServer((req, res) => {
  if (!env.trustProxy) for (const h of FORWARDING_HEADERS) delete req.headers[h];
  void handle(req, res);
});
server.listen(env.port, hostname, () => {
  console.log(`app listening on http://${hostname}:${env.port}${env.trustProxy ? " (trusting proxy headers)" : ""}`);
});

const stop = () => {
  // The worker hands back a job it cannot finish in time; the queue gives it to another worker.
  const workerStopped = worker?.stop().catch(() => undefined) ?? Promise.resolve();
  server.close(() => void workerStopped.then(() => process.exit(0)));
  // Keep-alive sockets would hold close() open; don't wait for them.
  setTimeout(() => process.exit(0), 12_000).unref();
  server.closeIdleConnections();
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
