import { readFileSync } from "node:fs";
import path from "node:path";
import { z } from "zod";

/** Empty strings count as unset, so `FOO= npm start` falls back to the default. */
const optional = <T extends z.ZodType>(schema: T) =>
  z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? undefined : v), schema.optional());

const boolish = z.enum(["true", "false", "1", "0"]).transform((v) => v === "true" || v === "1");

const envSchema = z.object({
  NODE_ENV: optional(z.enum(["development", "production", "test"])),
  DATABASE_URL: optional(z.string().url()),
  SESSION_SECRET: optional(z.string().min(32, "SESSION_SECRET must be at least 32 characters")),
  SMTP_URL: optional(z.string().url()),
  MAIL_FROM: optional(z.string().min(3)),
  PORT: optional(z.coerce.number().int().min(1).max(65535)),
  APP_URL: optional(z.string().url()),
  COOKIE_SECURE: optional(boolish),
  CYCLEGATE_DATA_DIR: optional(z.string().min(1)),
  CYCLEGATE_DEMO_PASSWORD: optional(z.string().min(8)),
  MAIL_DIR: optional(z.string().min(1)),
  TRUST_PROXY: optional(boolish),
  UPLOAD_MAX_BYTES: optional(z.coerce.number().int().min(1024).max(1024 * 1024 * 1024)),
  ANALYSIS_TIMEOUT_SECONDS: optional(z.coerce.number().int().min(1).max(6 * 60 * 60)),
  ANALYSIS_RETRIES: optional(z.coerce.number().int().min(0).max(20)),
  JOB_POLL_SECONDS: optional(z.coerce.number().min(0.5).max(600)),
  JOB_MAINTENANCE_SECONDS: optional(z.coerce.number().int().min(1).max(3600)),
  MAIL_RETRIES: optional(z.coerce.number().int().min(0).max(50)),
  CYCLEGATE_WORKER: optional(boolish),
  CYCLEGATE_ANALYSIS_DELAY_MS: optional(z.coerce.number().int().min(0).max(600_000)),
});

export type Env = {
  nodeEnv: "development" | "production" | "test";
  databaseUrl: string;
  sessionSecret: string;
  smtpUrl: string;
  mailFrom: string;
  port: number;
  appUrl: string;
  cookieSecure: boolean;
  dataDir: string;
  demoPassword: string;
  mailDir: string;
  /** Keep X-Forwarded-* from the client: only behind a reverse proxy that sets them. */
  trustProxy: boolean;
  /** Largest program upload in bytes (413 above it). */
  uploadMaxBytes: number;
  /** An analysis job running longer than this is failed (and retried); also how long a killed worker's job waits. */
  analysisTimeoutSeconds: number;
  /** Retries of a failed analysis job before the revision is marked failed. */
  analysisRetries: number;
  /** How often an idle worker looks for jobs (workers are also woken right after an upload commits). */
  jobPollSeconds: number;
  /** How often the job queue looks for jobs of workers that died. */
  jobMaintenanceSeconds: number;
  /** Retries of an outbox message before it is marked failed. */
  mailRetries: number;
  /** Run the analysis and mail worker inside the app process (npm start); false leaves it to npm run worker. */
  inProcessWorker: boolean;
  /** Fault injection for tests only: every analysis waits this long first (so a test can kill a worker mid-job). */
  analysisDelayMs: number;
};

function readSecretFile(dataDir: string): string | undefined {
  try {
    const s = readFileSync(path.join(dataDir, "session-secret"), "utf8").trim();
    return s.length >= 32 ? s : undefined;
  } catch {
    return undefined;
  }
}

/** Parses and completes the settings; throws one readable error listing every bad variable. */
export function loadEnv(
  source: Record<string, string | undefined> = process.env,
  opts: { needSecret?: boolean } = {},
): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  const e = parsed.data;
  const dataDir = path.resolve(/*turbopackIgnore: true*/ e.CYCLEGATE_DATA_DIR ?? path.join(process.cwd(), ".data"));
  const port = e.PORT ?? 3000;
  const appUrl = e.APP_URL ?? `http://localhost:${port}`;
  const plainLocalHttp = /^http:\/\/(localhost|127\.0\.0\.1)(:|\/|$)/.test(appUrl);
  const sessionSecret = e.SESSION_SECRET ?? readSecretFile(dataDir);
  if (!sessionSecret && opts.needSecret !== false) {
    throw new Error(
      "Invalid environment:\n  SESSION_SECRET: not set and no session-secret file in the data folder (npm start creates one)",
    );
  }
  return {
    nodeEnv: e.NODE_ENV ?? "development",
    databaseUrl: e.DATABASE_URL ?? "postgres://cyclegate@127.0.0.1:54329/cyclegate",
    sessionSecret: sessionSecret ?? "",
    smtpUrl: e.SMTP_URL ?? "smtp://127.0.0.1:2525",
    mailFrom: e.MAIL_FROM ?? "Cyclegate <no-reply@cyclegate.test>",
    port,
    appUrl,
    // Secure cookies unless explicitly turned off, or the app is plain http on this machine.
    cookieSecure: e.COOKIE_SECURE ?? !plainLocalHttp,
    dataDir,
    demoPassword: e.CYCLEGATE_DEMO_PASSWORD ?? "cyclegate-demo",
    mailDir: e.MAIL_DIR ?? path.join(dataDir, "mail"),
    trustProxy: e.TRUST_PROXY ?? false,
    uploadMaxBytes: e.UPLOAD_MAX_BYTES ?? 50 * 1024 * 1024,
    analysisTimeoutSeconds: e.ANALYSIS_TIMEOUT_SECONDS ?? 600,
    analysisRetries: e.ANALYSIS_RETRIES ?? 2,
    jobPollSeconds: e.JOB_POLL_SECONDS ?? 2,
    jobMaintenanceSeconds: e.JOB_MAINTENANCE_SECONDS ?? 30,
    mailRetries: e.MAIL_RETRIES ?? 8,
    inProcessWorker: e.CYCLEGATE_WORKER ?? true,
    analysisDelayMs: e.CYCLEGATE_ANALYSIS_DELAY_MS ?? 0,
  };
}

let cached: Env | undefined;

/** The validated settings, read once per process. */
export function env(): Env {
  cached ??= loadEnv();
  return cached;
}
