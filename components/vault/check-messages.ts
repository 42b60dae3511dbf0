import type { MachineProfile, RuleId, Severity, Units } from "@/lib/gcode/types";

/** What the upload panel asks the in-browser check worker to do. */
export interface CheckRequest {
  file: Blob;
  machine: MachineProfile;
  safeZ?: number;
  parts?: number;
}

/** The in-browser summary: what the operator and the programmer look at first. */
export interface BrowserSummary {
  units: Units;
  lineCount: number;
  workOffsets: string[];
  tools: { number: number; description: string | null }[];
  toolChangeCount: number;
  totalSeconds: number;
  errors: number;
  warnings: number;
  /** The first few error findings, to say what is wrong before the server's check is in. */
  firstErrors: { rule: RuleId; severity: Severity; line: number; message: string }[];
  /** How long the check took in the browser, ms. */
  ms: number;
}

/** The worker's answers, in the order they come. */
export type CheckMessage =
  | { type: "hash"; sha256: string; via: "web-crypto" | "script" }
  | { type: "refused"; reason: string }
  | { type: "summary"; summary: BrowserSummary }
  | { type: "failed"; reason: string };
