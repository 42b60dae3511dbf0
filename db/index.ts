import "server-only";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

const globalForDb = globalThis as unknown as { cyclegatePool?: Pool; cyclegateDb?: Db };

/** The one pool per process; cached on globalThis so dev reloads don't open new ones. */
export function pool(): Pool {
  globalForDb.cyclegatePool ??= new Pool({
    connectionString: env().databaseUrl,
    max: 10,
    connectionTimeoutMillis: 5_000,
    idleTimeoutMillis: 30_000,
  });
  return globalForDb.cyclegatePool;
}

export function db(): Db {
  globalForDb.cyclegateDb ??= drizzle(pool(), { schema });
  return globalForDb.cyclegateDb;
}

export { schema };
