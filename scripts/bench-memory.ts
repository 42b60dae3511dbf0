/**
 * Child of the benchmark, run with node --expose-gc: reads the program file, then reports the memory the analysis
 * holds (heapUsed + external, which includes arrayBuffers; after gc, result alive), the same as RSS growth, and the
 * peak seen by sampling during the run from a worker thread (process RSS, which the worker can read while the main
 * thread is busy). RSS is the figure that sees everything: resizable ArrayBuffers (the engine grows the toolpath in
 * them during the run) are not counted in `external` by this V8, so only RSS shows them while they exist.
 */
import { readFileSync } from "node:fs";
import { Worker } from "node:worker_threads";
import { analyzeProgram } from "../lib/gcode";

const file = process.argv[2]!;
const gc = (globalThis as { gc?: () => void }).gc;
if (!gc) {
  process.stderr.write("bench-memory: run with --expose-gc\n");
  process.exit(2);
}
// external already includes arrayBuffers (Node's documentation), so adding both would count typed arrays twice
const used = (): number => {
  const m = process.memoryUsage();
  return m.heapUsed + m.external;
};
/** gc until freed backing stores are really released (they go on a background thread after the gc). */
const settle = async (): Promise<void> => {
  for (let i = 0; i < 3; i++) {
    gc!();
    await new Promise((r) => setTimeout(r, 100));
  }
};

async function main(): Promise<void> {
  const bytes = new Uint8Array(readFileSync(file));
  // warm up the code on a slice so the measured run is the steady state
  analyzeProgram(bytes.subarray(0, 200_000));
  gc!();
  gc!();
  const sab = new SharedArrayBuffer(16);
  const shared = new Float64Array(sab);
  const worker = new Worker(
    `const { workerData } = require("node:worker_threads");
     const a = new Float64Array(workerData);
     const tick = () => { const r = process.memoryUsage.rss(); if (r > a[0]) a[0] = r; if (a[1] === 0) setTimeout(tick, 1); };
     tick();`,
    { eval: true, workerData: sab },
  );
  await settle();
  const before = used();
  const rssBefore = process.memoryUsage.rss();
  shared[0] = rssBefore;
  const a = analyzeProgram(bytes);
  const peakRss = shared[0]!;
  shared[1] = 1;
  const afterNoGc = used();
  await settle();
  const after = used();
  const rssAfter = process.memoryUsage.rss();
  await worker.terminate();
  const tp = a.toolpath;
  const arrays = [tp.positions, tp.line, tp.kind, tp.tool, tp.offset];
  // a resizable buffer would be invisible to heapUsed+external: say so rather than report too little
  const resizable = arrays.some((x) => (x.buffer as { resizable?: boolean }).resizable === true);
  const lines = a.lineCount;
  process.stdout.write(
    JSON.stringify({
      lines,
      inputBytes: bytes.length,
      retained: after - before,
      beforeGc: afterNoGc - before,
      peakRssDelta: peakRss - rssBefore,
      retainedRss: rssAfter - rssBefore,
      resizable,
      segments: a.toolpath.segmentCount,
      toolpathBytes: arrays.reduce((s, x) => s + x.buffer.byteLength, 0),
    }) + "\n",
  );
}

void main();
