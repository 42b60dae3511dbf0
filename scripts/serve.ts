/**
 * Serves the app: `next start` (or `next dev` with --dev) behind a plain node:http server that
 *  - drops forwarding headers sent by the client. Next then fills X-Forwarded-For from the socket
 *    itself, so the address used for sign-in throttling and the audit record cannot be forged.
 *    Behind a reverse proxy of the shop's own, set TRUST_PROXY=true to keep the headers it adds;
 *  - puts the security headers (lib/security-headers.ts) on every answer, pages, JSON, static
 *    files and error pages alike, with a fresh script nonce per request that Next reads back from
 *    the request's Content-Security-Policy header;
 *  - refuses, with a JSON 4xx, what Next would answer with a 500 (lib/request-gate.ts): methods
 *    the app does not serve and oversized server-action bodies.
 *
 * The same process also runs the background worker (analysis jobs, mail outbox; lib/jobs/worker.ts) unless
 * CYCLEGATE_WORKER=false; `npm run worker` starts more of them against the same database.
 */
import { randomBytes } from "node:crypto";
import { createServer } from "node:http";
import path from "node:path";
import next from "next";
import { loadEnv } from "../lib/env";
import { ThreadAnalyser } from "../lib/jobs/analyser";
import { startWorker, type RunningWorker } from "../lib/jobs/worker";
import { gateRequest } from "../lib/request-gate";
import { contentSecurityPolicy, finalHeaders, securityHeaders } from "../lib/security-headers";
import { offerToolpathBuilder } from "../lib/viewer/toolpath-service";

const FORWARDING_HEADERS = ["x-forwarded-for", "x-forwarded-host", "x-forwarded-port", "x-forwarded-proto", "x-real-ip", "forwarded"];
/** A refused body is read and thrown away up to this much, so the client sees the answer; past it the connection is cut. */
const DRAIN_LIMIT_BYTES = 16 * 1024 * 1024;

const dev = process.argv.includes("--dev");
const env = loadEnv();
const https = env.appUrl.startsWith("https:");
const hostname = process.env.CYCLEGATE_HOST || "127.0.0.1";
const app = next({ dev, dir: path.resolve(import.meta.dirname, ".."), hostname, port: env.port });
const handle = app.getRequestHandler();

await app.prepare();
// The backplot's toolpath answers are built on a thread of their own (GET /api/revisions/{id}/toolpath).
offerToolpathBuilder(new ThreadAnalyser());
let worker: RunningWorker | null = null;
if (env.inProcessWorker) {
  worker = await startWorker({ env, inAppProcess: true });
  console.log("background worker running in this process (analysis jobs, mail)");
}
const server = createServer((req, res) => {
  if (!env.trustProxy) for (const h of FORWARDING_HEADERS) delete req.headers[h];
  const policy = { nonce: randomBytes(18).toString("base64"), dev, https };
  const path = (req.url ?? "/").split("?")[0] ?? "/";
  const { "Cache-Control": cacheControl, ...headers } = securityHeaders({ ...policy, path });
  for (const [name, value] of Object.entries(headers)) res.setHeader(name, value);
  // Cache-Control and a precompressed body's coding are settled as the headers go out (finalHeaders says why).
  const writeHead = res.writeHead;
  res.writeHead = function (this: typeof res, ...args: Parameters<typeof res.writeHead>) {
    finalHeaders(res, cacheControl, args.find((a, i) => i > 0 && typeof a === "object"));
    return writeHead.apply(this, args);
  } as typeof res.writeHead;
  // Next takes the nonce for its scripts from the request's policy; never from one the client sent.
  req.headers["content-security-policy"] = contentSecurityPolicy(policy);
  delete req.headers["content-security-policy-report-only"];

  const refusal = gateRequest(req);
  if (refusal) {
    for (const [name, value] of Object.entries(refusal.headers ?? {})) res.setHeader(name, value);
    res.setHeader("Connection", "close");
    res.writeHead(refusal.status, { "Content-Type": "application/json" });
    res.end(JSON.stringify({ error: refusal.error }));
    let drained = 0;
    req.on("data", (chunk: Buffer) => {
      drained += chunk.length;
      if (drained > DRAIN_LIMIT_BYTES) req.destroy();
    });
    return;
  }
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
