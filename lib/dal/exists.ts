import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { machines, programs, revisions } from "@/db/schema";
import { authorize } from "@/lib/auth/session";

const TABLES = {
  machine: { table: machines, id: machines.id, permission: "readMachines" },
  program: { table: programs, id: programs.id, permission: "readPrograms" },
  revision: { table: revisions, id: revisions.id, permission: "readPrograms" },
} as const;

export type RecordKind = keyof typeof TABLES;

/**
 * Whether a record exists, for the layouts of record pages: they decide "not found" before a loading
 * boundary starts streaming, so a missing record answers 404 rather than 200 with a "not found" body.
 */
export async function recordExists(kind: RecordKind, id: number): Promise<boolean> {
  const t = TABLES[kind];
  await authorize(t.permission);
  const [row] = await db().select({ id: t.id }).from(t.table).where(eq(t.id, id)).limit(1);
  return row !== undefined;
}
