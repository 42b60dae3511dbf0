import "server-only";
import { alias } from "drizzle-orm/pg-core";
import { revisionAnalyses, revisions, users, type AnalysisState, type RevisionStatus } from "@/db/schema";
import { ENGINE_VERSION } from "@/lib/gcode";
import { iso } from "@/lib/dal/sql";

/** The analysis summary shown in lists and on revision pages; `state` tells a page whether to keep polling. */
export interface AnalysisSummary {
  state: AnalysisState;
  /** Why the last attempt failed (also while a retry is pending). */
  error: string | null;
  attempts: number;
  engineVersion: number | null;
  /** False when made by an older engine (a re-analysis is on its way). */
  current: boolean;
  finishedAt: string | null;
  units: "mm" | "inch" | null;
  workOffsets: string[];
  toolCount: number | null;
  toolChangeCount: number | null;
  /** Tool numbers in the order they are loaded. */
  toolSequence: number[];
  toolOrder: string | null;
  totalSeconds: number | null;
  feedSeconds: number | null;
  rapidSeconds: number | null;
  errorCount: number | null;
  warningCount: number | null;
  infoCount: number | null;
}

export interface UserRef {
  id: number;
  name: string;
}

/** A revision without its bytes, as lists and the program page show it. */
export interface RevisionSummary {
  id: number;
  programId: number;
  number: number;
  status: RevisionStatus;
  fileName: string;
  sha256: string;
  size: number;
  lineCount: number;
  note: string;
  uploadedBy: UserRef;
  createdAt: string;
  submittedAt: string | null;
  decidedAt: string | null;
  decidedBy: UserRef | null;
  supersededAt: string | null;
  supersededById: number | null;
  analysis: AnalysisSummary | null;
}

export const uploader = alias(users, "uploader");
export const decider = alias(users, "decider");

/** Select columns for RevisionSummary; join `uploader`, left join `decider` and `revisionAnalyses`. */
export const revisionSummaryColumns = {
  id: revisions.id,
  programId: revisions.programId,
  number: revisions.number,
  status: revisions.status,
  fileName: revisions.fileName,
  sha256: revisions.sha256,
  size: revisions.size,
  lineCount: revisions.lineCount,
  note: revisions.note,
  uploadedById: uploader.id,
  uploadedByName: uploader.displayName,
  createdAt: revisions.createdAt,
  submittedAt: revisions.submittedAt,
  decidedAt: revisions.decidedAt,
  decidedById: decider.id,
  decidedByName: decider.displayName,
  supersededAt: revisions.supersededAt,
  supersededById: revisions.supersededById,
  aState: revisionAnalyses.state,
  aError: revisionAnalyses.error,
  aAttempts: revisionAnalyses.attempts,
  aEngine: revisionAnalyses.engineVersion,
  aFinished: revisionAnalyses.finishedAt,
  aUnits: revisionAnalyses.units,
  aOffsets: revisionAnalyses.workOffsets,
  aTools: revisionAnalyses.toolCount,
  aChanges: revisionAnalyses.toolChangeCount,
  aSequence: revisionAnalyses.toolSequence,
  aOrder: revisionAnalyses.toolOrder,
  aTotal: revisionAnalyses.totalSeconds,
  aFeed: revisionAnalyses.feedSeconds,
  aRapid: revisionAnalyses.rapidSeconds,
  aErrors: revisionAnalyses.errorCount,
  aWarnings: revisionAnalyses.warningCount,
  aInfos: revisionAnalyses.infoCount,
};

type SummaryRow = {
  [K in keyof typeof revisionSummaryColumns]: (typeof revisionSummaryColumns)[K]["_"]["data"] | null;
};

export function toRevisionSummary(r: SummaryRow): RevisionSummary {
  return {
    id: r.id!,
    programId: r.programId!,
    number: r.number!,
    status: r.status!,
    fileName: r.fileName!,
    sha256: r.sha256!,
    size: r.size!,
    lineCount: r.lineCount!,
    note: r.note ?? "",
    uploadedBy: { id: r.uploadedById!, name: r.uploadedByName! },
    createdAt: r.createdAt!.toISOString(),
    submittedAt: iso(r.submittedAt),
    decidedAt: iso(r.decidedAt),
    decidedBy: r.decidedById ? { id: r.decidedById, name: r.decidedByName! } : null,
    supersededAt: iso(r.supersededAt),
    supersededById: r.supersededById,
    analysis: r.aState
      ? {
          state: r.aState,
          error: r.aError,
          attempts: r.aAttempts ?? 0,
          engineVersion: r.aEngine,
          current: r.aEngine === ENGINE_VERSION,
          finishedAt: iso(r.aFinished),
          units: r.aUnits,
          workOffsets: r.aOffsets ?? [],
          toolCount: r.aTools,
          toolChangeCount: r.aChanges,
          toolSequence: r.aSequence ?? [],
          toolOrder: r.aOrder,
          totalSeconds: r.aTotal,
          feedSeconds: r.aFeed,
          rapidSeconds: r.aRapid,
          errorCount: r.aErrors,
          warningCount: r.aWarnings,
          infoCount: r.aInfos,
        }
      : null,
  };
}
