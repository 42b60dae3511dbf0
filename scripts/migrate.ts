import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Pool } from "pg";
import { loadEnv } from "../lib/env";

const { databaseUrl } = loadEnv(process.env, { needSecret: false });
const pool = new Pool({ connectionString: databaseUrl, max: 1 });
try {
  await migrate(drizzle(pool), { migrationsFolder: path.join(import.meta.dirname, "..", "db", "migrations") });
  console.log("migrations applied");
} catch (err) {
  console.error(`migration failed: ${err instanceof Error ? err.message : String(err)}`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
