import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema> & { $client: Pool };
/** A Drizzle transaction handle (what `db.transaction(async (tx) => ...)` passes). */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** A pg pool with the project's timeouts. */
export function createPool(connectionString: string, max = 10): Pool {
  return new Pool({ connectionString, max, connectionTimeoutMillis: 5_000, idleTimeoutMillis: 30_000 });
}

/**
 * A Drizzle client on `pool` (or on a new pool for `connectionString`). The app makes one per process
 * (db/index.ts); scripts and the job worker, which run outside Next, make their own with this.
 */
export function createDb(poolOrUrl: Pool | string, max = 10): Db {
  const pool = typeof poolOrUrl === "string" ? createPool(poolOrUrl, max) : poolOrUrl;
  return drizzle(pool, { schema }) as Db;
}
