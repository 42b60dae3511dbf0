/**
 * The in-browser check, off the page's thread: the SHA-256 of the dropped file (Web Crypto; a script
 * implementation where the page is not a secure context, e.g. plain http on the shop's LAN), then the same
 * `checkTextProgram` and `analyzeProgram` the server runs, with the program's machine profile.
 */
import { sha256 } from "@noble/hashes/sha2.js";
import { analyzeProgram, checkTextProgram } from "@/lib/gcode";
import type { BrowserSummary, CheckMessage, CheckRequest } from "./check-messages";

const scope = self as unknown as {
  onmessage: ((e: MessageEvent<CheckRequest>) => void) | null;
  postMessage(message: CheckMessage): void;
  crypto?: Crypto;
};

const hex = (buf: ArrayBuffer | Uint8Array) =>
  Array.from(buf instanceof Uint8Array ? buf : new Uint8Array(buf), (b) => b.toString(16).padStart(2, "0")).join("");

async function hashOf(bytes: Uint8Array): Promise<{ sha256: string; via: "web-crypto" | "script" }> {
  const subtle = scope.crypto?.subtle;
  if (subtle) return { sha256: hex(await subtle.digest("SHA-256", bytes as Uint8Array<ArrayBuffer>)), via: "web-crypto" };
  return { sha256: hex(sha256(bytes)), via: "script" };
}

scope.onmessage = async (e) => {
  const { file, machine, safeZ, parts } = e.data;
  try {
    const bytes = new Uint8Array(await file.arrayBuffer());
    scope.postMessage({ type: "hash", ...(await hashOf(bytes)) });
    const text = checkTextProgram(bytes);
    if (!text.ok) {
      scope.postMessage({ type: "refused", reason: text.reason });
      return;
    }
    const t0 = performance.now();
    const a = analyzeProgram(bytes, { machine, safeZ, parts, toolpath: false, maxFindingsPerRule: 5 });
    const count = (s: string) => a.findingCounts.filter((c) => c.severity === s).reduce((n, c) => n + c.count, 0);
    const summary: BrowserSummary = {
      units: a.units,
      lineCount: a.lineCount,
      workOffsets: a.workOffsets.map((o) => o.code),
      tools: a.tools.map((t) => ({ number: t.number, description: t.description })),
      toolChangeCount: a.toolChangeCount,
      totalSeconds: a.time.totalSeconds,
      errors: count("error"),
      warnings: count("warning"),
      firstErrors: a.findings
        .filter((f) => f.severity === "error")
        .slice(0, 5)
        .map((f) => ({ rule: f.rule, severity: f.severity, line: f.line, message: f.message })),
      ms: Math.round(performance.now() - t0),
    };
    scope.postMessage({ type: "summary", summary });
  } catch (err) {
    scope.postMessage({ type: "failed", reason: err instanceof Error ? err.message : String(err) });
  }
};
