import "server-only";
import type { Pool } from "pg";
import { env } from "@/lib/env";
import { createDb, type Db, type Tx } from "./client";
import * as schema from "./schema";

export type { Db, Tx };

const globalForDb = globalThis as unknown as { cyclegateDb?: Db };

/** The one Drizzle client per process; cached on globalThis so dev reloads don't open new pools. */
export function db(): Db {
  globalForDb.cyclegateDb ??= createDb(env().databaseUrl, 10);
  return globalForDb.cyclegateDb;
}

/** The one pool per process (the one db() uses). */
export function pool(): Pool {
  return db().$client;
}

export { schema };
