import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { machines, programs, revisions } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import type { AnalyzeOptions } from "@/lib/gcode/types";
import { analysisOptions, readFileBytes } from "@/lib/jobs/analysis";

/** What the toolpath of a revision is made from: its file and the options its analysis runs with. */
export interface ToolpathSource {
  sha256: string;
  /** The engine's options for the program on its machine (the same as the stored analysis'). */
  options: AnalyzeOptions;
  /** Reads the file's bytes (from the in-memory file cache when it holds them). */
  readBytes: () => Promise<Uint8Array>;
}

/** The toolpath source of a revision, or null when there is no such revision. Any signed-in role reads it. */
export async function getToolpathSource(id: number): Promise<ToolpathSource | null> {
  await authorize("readPrograms");
  const [row] = await db()
    .select({ sha256: revisions.sha256, machine: machines, safeZ: programs.safeZ, partsPerCycle: programs.partsPerCycle })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .where(eq(revisions.id, id));
  if (!row) return null;
  return {
    sha256: row.sha256,
    options: analysisOptions(row.machine, row),
    readBytes: async () => {
      const bytes = await readFileBytes(db(), row.sha256);
      if (!bytes) throw new Error(`the bytes of ${row.sha256} are missing`);
      return bytes;
    },
  };
}
