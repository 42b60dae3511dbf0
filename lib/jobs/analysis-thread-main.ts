/**
 * Runs the engine off the main thread, so a long analysis never stalls the app's requests. Messages in:
 * { id, bytes: ArrayBuffer (transferred), options }; out: { id, ok: true, analysis } or { id, ok: false, error }.
 */
import { parentPort } from "node:worker_threads";
import { analyzeProgram } from "../gcode/index";
import type { AnalyzeOptions } from "../gcode/types";

if (!parentPort) throw new Error("analysis-thread-main must run in a worker thread");
const port = parentPort;

port.on("message", (msg: { id: number; bytes: ArrayBuffer; options: AnalyzeOptions; delayMs?: number }) => {
  const run = () => {
    try {
      const { toolpath: _omit, ...analysis } = analyzeProgram(new Uint8Array(msg.bytes), { ...msg.options, toolpath: false });
      port.postMessage({ id: msg.id, ok: true, analysis });
    } catch (e) {
      port.postMessage({ id: msg.id, ok: false, error: e instanceof Error ? e.message : String(e) });
    }
  };
  if (msg.delayMs) setTimeout(run, msg.delayMs);
  else run();
});
