import { Worker } from "node:worker_threads";
import type { Analysis, AnalyzeOptions } from "../gcode/types";
import type { ToolpathAnswer } from "../viewer/toolpath-answer";

/** What the job stores: the engine's result without the toolpath (the browser rebuilds that from the bytes). */
export type StoredAnalysis = Omit<Analysis, "toolpath">;

type Pending = { resolve: (a: unknown) => void; reject: (e: Error) => void };
/** What the thread does with the bytes: the stored analysis (jobs), or the toolpath route's answer (lib/viewer). */
type Task = "analysis" | "toolpath";

/**
 * One long-lived worker thread running the engine. A thread that crashes fails the analyses it held and is
 * replaced on the next call.
 */
export class ThreadAnalyser {
  private worker: Worker | null = null;
  private nextId = 1;
  private pending = new Map<number, Pending>();

  /** `delayMs` holds the analysis back that long (fault-injection for the killed-worker test). */
  constructor(private readonly delayMs = 0) {}

  private thread(): Worker {
    if (this.worker) return this.worker;
    const w = new Worker(new URL("./analysis-thread.mjs", import.meta.url));
    w.unref();
    w.on("message", (m: { id: number; ok: boolean; result?: unknown; error?: string }) => {
      const p = this.pending.get(m.id);
      if (!p) return;
      this.pending.delete(m.id);
      if (m.ok && m.result) p.resolve(m.result);
      else p.reject(new Error(m.error ?? "the analysis failed"));
    });
    const fail = (e: Error) => {
      if (this.worker === w) this.worker = null;
      for (const p of this.pending.values()) p.reject(e);
      this.pending.clear();
    };
    w.on("error", (e) => fail(new Error(`the analysis thread crashed: ${e.message}`)));
    w.on("exit", (code) => fail(new Error(`the analysis thread exited (code ${code})`)));
    this.worker = w;
    return w;
  }

  /** Analyses `bytes` on the thread. The caller's buffer stays usable (it may be a cached, shared copy). */
  analyse(bytes: Uint8Array, options: AnalyzeOptions): Promise<StoredAnalysis> {
    return this.run("analysis", bytes, options) as Promise<StoredAnalysis>;
  }

  /** The toolpath route's encoded, compressed answer for `bytes` (lib/viewer/toolpath-answer.ts), on the thread. */
  toolpath(bytes: Uint8Array, options: AnalyzeOptions): Promise<ToolpathAnswer> {
    return this.run("toolpath", bytes, options) as Promise<ToolpathAnswer>;
  }

  private run(task: Task, bytes: Uint8Array, options: AnalyzeOptions): Promise<unknown> {
    const id = this.nextId++;
    const w = this.thread();
    // One copy (milliseconds for 20 MB), handed over without another.
    const buffer = new Uint8Array(bytes).buffer as ArrayBuffer;
    return new Promise<unknown>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      w.ref();
      w.postMessage({ id, task, bytes: buffer, options, delayMs: this.delayMs }, [buffer]);
    }).finally(() => {
      if (this.pending.size === 0) this.worker?.unref();
    });
  }

  async close(): Promise<void> {
    const w = this.worker;
    this.worker = null;
    if (w) await w.terminate();
  }
}
