import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema> & { $client: Pool };
/** A Drizzle transaction handle (what `db.transaction(async (tx) => ...)` passes). */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/**
 * A pool and its Drizzle client. The app makes one per process (db/index.ts); scripts and the job worker, which run
 * outside Next, make their own with this.
 */
export function createDb(connectionString: string, max = 10): Db {
  const pool = new Pool({ connectionString, max, connectionTimeoutMillis: 5_000, idleTimeoutMillis: 30_000 });
  return drizzle(pool, { schema }) as Db;
}
