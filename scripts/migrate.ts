import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Pool } from "pg";
import { loadEnv } from "../lib/env";
import { prepareJobQueue } from "../lib/jobs/worker";

const env = loadEnv(process.env, { needSecret: false });
const { databaseUrl } = env;
const pool = new Pool({ connectionString: databaseUrl, max: 1 });
try {
  await migrate(drizzle(pool), { migrationsFolder: path.join(import.meta.dirname, "..", "db", "migrations") });
  // The job queue's own tables (pg-boss migrates its schema "pgboss") and the analysis queues.
  await prepareJobQueue(env);
  console.log("migrations applied");
} catch (err) {
  console.error(`migration failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
