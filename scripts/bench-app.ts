/**
 * What the app benchmarks share: a throwaway database in the project's main cluster (dropped before and after; never
 * the demo database), the built app started on it with its in-process worker, a user to sign in as, and the
 * printing of figures.
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import net from "node:net";
import path from "node:path";
import { hash } from "@node-rs/argon2";
import pg from "pg";
import { ARGON2_OPTIONS } from "../lib/auth/argon2-options";

export const root = path.resolve(import.meta.dirname, "..");

export const sh = (cmd: string, env: Record<string, string> = {}) =>
  execFileSync("bash", ["-c", `source scripts/lib.sh && ${cmd}`], { cwd: root, env: { ...process.env, ...env }, encoding: "utf8", stdio: ["ignore", "pipe", "inherit"] }).trim();

export const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor((xs.length - 1) / 2)]!;
export const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.ceil((p / 100) * xs.length) - 1)]!;
export const ms = (n: number) => `${n.toFixed(0)} ms`;
export const line = (label: string, value: string) => console.log(`  ${label.padEnd(52)} ${value}`);
export const verdict = (ok: boolean) => (ok ? "PASS" : "FAIL");

export async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, "127.0.0.1", () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

export interface BenchApp {
  base: string;
  app: ChildProcess;
  db: pg.Pool;
  /** A user of `role` with this password, signed in over the API: the session cookie. */
  user(email: string, role: "programmer" | "operator" | "lead" | "admin", password: string): Promise<string>;
  close(): Promise<void>;
}

/** Creates the throwaway database `name`, builds the app when stale and serves it on a free port. */
export async function startBenchApp(name: string): Promise<BenchApp> {
  sh("cg_env_defaults && cg_ensure_node_modules");
  const wasRunning = (() => {
    try {
      sh("bash scripts/pg.sh status >/dev/null 2>&1");
      return true;
    } catch {
      return false;
    }
  })();
  sh("bash scripts/pg.sh start >/dev/null");
  const admin = new pg.Pool({ connectionString: sh("bash scripts/pg.sh url"), max: 1 });
  await admin.query(`drop database if exists ${name} with (force)`);
  const url = sh(`bash scripts/pg.sh ensure-db ${name}`);
  sh("cg_migrate", { DATABASE_URL: url });
  sh("cg_env_defaults && cg_build_if_stale >&2");
  const db = new pg.Pool({ connectionString: url, max: 4 });
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const app = spawn(process.execPath, ["--import", "tsx", "scripts/serve.ts"], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATABASE_URL: url,
      PORT: String(port),
      APP_URL: base,
      CYCLEGATE_HOST: "127.0.0.1",
      SESSION_SECRET: randomBytes(32).toString("hex"),
      COOKIE_SECURE: "false",
      CYCLEGATE_WORKER: "true",
      // Mail is not measured: nothing listens there, the outbox keeps the messages.
      SMTP_URL: "smtp://127.0.0.1:9",
    },
    stdio: ["ignore", "ignore", "inherit"],
  });
  const close = async () => {
    if (app.exitCode === null) {
      app.kill("SIGTERM");
      await new Promise((r) => app.once("exit", r));
    }
    await db.end();
    // BENCH_KEEP=1 keeps the database for a look at query plans; the next run drops it anyway.
    if (process.env.BENCH_KEEP !== "1") await admin.query(`drop database if exists ${name} with (force)`);
    await admin.end();
    if (!wasRunning) sh("bash scripts/pg.sh stop >/dev/null");
  };
  try {
    for (let i = 0; ; i++) {
      if (app.exitCode !== null) throw new Error("the app exited");
      const ok = await fetch(`${base}/api/health`).then((r) => r.ok, () => false);
      if (ok) break;
      if (i > 600) throw new Error("the app did not answer");
      await new Promise((r) => setTimeout(r, 100));
    }
  } catch (e) {
    await close();
    throw e;
  }
  const user = async (email: string, role: string, password: string) => {
    await db.query(`insert into users (email, display_name, role, password_hash) values ($1, $2, $3, $4)`, [email, `Bench ${role}`, role, await hash(password, ARGON2_OPTIONS)]);
    const res = await fetch(`${base}/api/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email, password }) });
    if (!res.ok) throw new Error(`sign-in as ${email} answered ${res.status}`);
    return (res.headers.get("set-cookie") ?? "").split(";")[0]!;
  };
  return { base, app, db, user, close };
}
