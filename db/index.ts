import "server-only";
import type { Pool } from "pg";
import { env } from "@/lib/env";
import { createDb, createPool, type Db, type Tx } from "./client";
import * as schema from "./schema";

export type { Db, Tx };

const globalForDb = globalThis as unknown as { cyclegatePool?: Pool; cyclegateDb?: Db };

/** The one pool per process; cached on globalThis so dev reloads don't open new ones. */
export function pool(): Pool {
  globalForDb.cyclegatePool ??= createPool(env().databaseUrl, 10);
  return globalForDb.cyclegatePool;
}

export function db(): Db {
  globalForDb.cyclegateDb ??= createDb(pool());
  return globalForDb.cyclegateDb;
}

export { schema };
