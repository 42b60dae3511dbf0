import "server-only";
import { and, desc, eq, ne } from "drizzle-orm";
import { db } from "@/db";
import { machines, programs, revisions } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import type { AnalyzeOptions } from "@/lib/gcode/types";
import { analysisOptions, readFileBytes } from "@/lib/jobs/analysis";
import { toolpathAnswer, toolpathEtag } from "@/lib/viewer/toolpath-service";

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

/** What the revision page's backplot needs besides the path: the machine, the options, the other revisions. */
export interface BackplotSetup {
  revisionNumber: number;
  options: AnalyzeOptions;
  machine: {
    id: number;
    name: string;
    units: "mm" | "inch";
    travel: { x: { min: number; max: number }; y: { min: number; max: number }; z: { min: number; max: number } };
    manualToolChange: boolean;
  };
  /** The program's other revisions, newest first. */
  otherRevisions: { id: number; number: number; status: string }[];
}

export async function getBackplotSetup(revisionId: number): Promise<BackplotSetup | null> {
  await authorize("readPrograms");
  const [row] = await db()
    .select({ number: revisions.number, programId: revisions.programId, machine: machines, safeZ: programs.safeZ, partsPerCycle: programs.partsPerCycle })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .where(eq(revisions.id, revisionId));
  if (!row) return null;
  const others = await db()
    .select({ id: revisions.id, number: revisions.number, status: revisions.status })
    .from(revisions)
    .where(and(eq(revisions.programId, row.programId), ne(revisions.id, revisionId)))
    .orderBy(desc(revisions.number));
  const m = row.machine;
  return {
    revisionNumber: row.number,
    options: analysisOptions(m, row),
    machine: {
      id: m.id,
      name: m.name,
      units: m.units,
      travel: { x: { min: m.travelXMin, max: m.travelXMax }, y: { min: m.travelYMin, max: m.travelYMax }, z: { min: m.travelZMin, max: m.travelZMax } },
      manualToolChange: m.manualToolChange,
    },
    otherRevisions: others,
  };
}

/**
 * Starts building a revision's toolpath answer now (while its page renders), so the browser's request, which comes
 * after the page has loaded, finds it built or under way. Errors are left to that request.
 */
export async function prewarmToolpath(id: number): Promise<void> {
  const source = await getToolpathSource(id);
  if (!source) return;
  toolpathAnswer(toolpathEtag(source.sha256, source.options), source.readBytes, source.options).catch(() => undefined);
}
