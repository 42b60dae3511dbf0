import { Worker } from "node:worker_threads";
import type { Analysis, AnalyzeOptions } from "../gcode/types";

/** What the job stores: the engine's result without the toolpath (the browser rebuilds that from the bytes). */
export type StoredAnalysis = Omit<Analysis, "toolpath">;

type Pending = { resolve: (a: StoredAnalysis) => void; reject: (e: Error) => void };

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
    w.on("message", (m: { id: number; ok: boolean; analysis?: StoredAnalysis; error?: string }) => {
      const p = this.pending.get(m.id);
      if (!p) return;
      this.pending.delete(m.id);
      if (m.ok && m.analysis) p.resolve(m.analysis);
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
    const id = this.nextId++;
    const w = this.thread();
    // One copy (milliseconds for 20 MB), handed over without another.
    const buffer = new Uint8Array(bytes).buffer as ArrayBuffer;
    return new Promise<StoredAnalysis>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      w.ref();
      w.postMessage({ id, bytes: buffer, options, delayMs: this.delayMs }, [buffer]);
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
