/**
 * What a run records of the checks: the work offsets a revision calls with the values recorded for the machine, and its
 * tools in load order with their H and D numbers. Read by the sign-off (lib/dal/runs.ts) and the demo seed alike. No
 * `server-only` and relative imports only: scripts import it.
 */
import { asc, eq, sql } from "drizzle-orm";
import type { Db, Tx } from "../db/client";
import { machineWorkOffsets, revisionAnalyses, revisionOffsets, revisionTools, users } from "../db/schema";
import { inLoadOrder } from "./run-checklist";

/** A work offset as a run records it: the values recorded for the machine then, or nulls when none were. */
export interface RunOffsetValue {
  code: string;
  x: number | null;
  y: number | null;
  z: number | null;
  setAt: string | null;
  setBy: { id: number; name: string } | null;
}

/** A tool the operator confirmed loaded, with the offsets the program uses with it. */
export interface RunTool {
  number: number;
  lengthOffsets: number[];
  diameterOffsets: number[];
}

export interface RunChecks {
  /** Work offset codes in the order the revision first uses them. */
  offsetCodes: string[];
  /** In load order. */
  tools: RunTool[];
  /** Values recorded for the machine, by code. */
  recorded: Map<string, RunOffsetValue>;
}

/** The checks of `revisionId` on `machineId`, one query after another (inside a transaction they share a connection). */
export async function runChecksOf(tx: Tx | Db, revisionId: number, machineId: number): Promise<RunChecks> {
  const [analysis] = await tx
    .select({ sequence: revisionAnalyses.toolSequence, d: sql<{ number: number; diameterOffsets: number[] }[] | null>`${revisionAnalyses.result}->'tools'` })
    .from(revisionAnalyses)
    .where(eq(revisionAnalyses.revisionId, revisionId));
  const offsetRows = await tx
    .select({ code: revisionOffsets.code })
    .from(revisionOffsets)
    .where(eq(revisionOffsets.revisionId, revisionId))
    .orderBy(asc(revisionOffsets.position));
  const toolRows = await tx
    .select({ number: revisionTools.toolNumber, lengthOffsets: revisionTools.lengthOffsets, firstLine: revisionTools.firstLine })
    .from(revisionTools)
    .where(eq(revisionTools.revisionId, revisionId));
  const recordedRows = await tx
    .select({
      code: machineWorkOffsets.code,
      x: machineWorkOffsets.x,
      y: machineWorkOffsets.y,
      z: machineWorkOffsets.z,
      setAt: machineWorkOffsets.setAt,
      setById: users.id,
      setByName: users.displayName,
    })
    .from(machineWorkOffsets)
    .leftJoin(users, eq(users.id, machineWorkOffsets.setBy))
    .where(eq(machineWorkOffsets.machineId, machineId));
  const diameters = new Map((analysis?.d ?? []).map((t) => [t.number, t.diameterOffsets ?? []]));
  return {
    offsetCodes: offsetRows.map((o) => o.code),
    tools: inLoadOrder(toolRows, analysis?.sequence ?? []).map((t) => ({ number: t.number, lengthOffsets: t.lengthOffsets, diameterOffsets: diameters.get(t.number) ?? [] })),
    recorded: new Map(
      recordedRows.map((r) => [
        r.code,
        { code: r.code, x: r.x, y: r.y, z: r.z, setAt: r.setAt.toISOString(), setBy: r.setById !== null ? { id: r.setById, name: r.setByName! } : null },
      ]),
    ),
  };
}

/** The offsets as a run records them: each code the revision calls with its recorded value, or nulls. */
export function offsetsAsRecorded(checks: RunChecks): RunOffsetValue[] {
  return checks.offsetCodes.map((code) => checks.recorded.get(code) ?? { code, x: null, y: null, z: null, setAt: null, setBy: null });
}
