/**
 * Runs the engine off the main thread, so a long analysis never stalls the app's requests. Messages in:
 * { id, task, bytes: ArrayBuffer (transferred), options }; out: { id, ok: true, result } or { id, ok: false, error }.
 * Tasks: "analysis" (the stored analysis, without the toolpath) and "toolpath" (the toolpath route's answer).
 */
import { parentPort } from "node:worker_threads";
import { analyzeProgram } from "../gcode/index";
import type { AnalyzeOptions } from "../gcode/types";
import { buildToolpathAnswer } from "../viewer/toolpath-answer";

if (!parentPort) throw new Error("analysis-thread-main must run in a worker thread");
const port = parentPort;

port.on("message", (msg: { id: number; task: "analysis" | "toolpath"; bytes: ArrayBuffer; options: AnalyzeOptions; delayMs?: number }) => {
  const run = () => {
    try {
      const bytes = new Uint8Array(msg.bytes);
      if (msg.task === "toolpath") {
        const result = buildToolpathAnswer(bytes, msg.options);
        port.postMessage({ id: msg.id, ok: true, result }, [result.br.buffer as ArrayBuffer, result.gzip.buffer as ArrayBuffer]);
        return;
      }
      const { toolpath: _omit, ...result } = analyzeProgram(bytes, { ...msg.options, toolpath: false });
      port.postMessage({ id: msg.id, ok: true, result });
    } catch (e) {
      port.postMessage({ id: msg.id, ok: false, error: e instanceof Error ? e.message : String(e) });
    }
  };
  if (msg.delayMs) setTimeout(run, msg.delayMs);
  else run();
});
