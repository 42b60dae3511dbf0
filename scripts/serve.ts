/**
 * Serves the app: `next start` (or `next dev` with --dev) behind a plain node:http server that drops
 * forwarding headers sent by the client. Next then fills X-Forwarded-For from the socket itself, so
 * the address used for sign-in throttling and the audit record cannot be forged. Behind a reverse
 * proxy of the shop's own, set TRUST_PROXY=true to keep the headers that proxy adds.
 */
import { createServer } from "node:http";
import path from "node:path";
import next from "next";
import { loadEnv } from "../lib/env";

const FORWARDING_HEADERS = ["x-forwarded-for", "x-forwarded-host", "x-forwarded-port", "x-forwarded-proto", "x-real-ip", "forwarded"];

const dev = process.argv.includes("--dev");
const env = loadEnv();
const hostname = process.env.CYCLEGATE_HOST || "127.0.0.1";
const app = next({ dev, dir: path.resolve(import.meta.dirname, ".."), hostname, port: env.port });
const handle = app.getRequestHandler();

await app.prepare();
const server = createServer((req, res) => {
  if (!env.trustProxy) for (const h of FORWARDING_HEADERS) delete req.headers[h];
  void handle(req, res);
});
server.listen(env.port, hostname, () => {
  console.log(`app listening on http://${hostname}:${env.port}${env.trustProxy ? " (trusting proxy headers)" : ""}`);
});

const stop = () => {
  server.close(() => process.exit(0));
  // Keep-alive sockets would hold close() open; don't wait for them.
  setTimeout(() => process.exit(0), 2_000).unref();
  server.closeIdleConnections();
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
