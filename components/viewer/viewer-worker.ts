/**
 * The backplot's worker: fetches a revision's toolpath (the route's CGTP answer, or the file run through the engine
 * here), builds the GPU buffers and hands them to the page without copying (transferred). It keeps what it needs
 * to rebuild the indices when tools, offsets or rapids are shown or hidden, and to compare with another revision.
 */
import { analyzeProgram } from "@/lib/gcode";
import { MotionKind } from "@/lib/gcode/types";
import { offsetBoxes } from "@/lib/viewer/placement";
import { viewerDataFromAnalysis } from "@/lib/viewer/from-analysis";
import { diffPaths } from "@/lib/viewer/overlay-diff";
import { pausesOf } from "@/lib/viewer/playback";
import { buildIndices, drawablePairs, flaggedPairs, vertexAttributes, type StyleIndices } from "@/lib/viewer/render-buffers";
import { decodeToolpath } from "@/lib/viewer/toolpath-format";
import type { ViewerMeta, ViewerPath } from "@/lib/viewer/types";
import type { FromWorker, LoadReport, PathBuffers, PathRequest, ToWorker } from "./messages";

const scope = self as unknown as {
  onmessage: ((e: MessageEvent<ToWorker>) => void) | null;
  postMessage(message: FromWorker, transfer?: Transferable[]): void;
};

let current: { path: ViewerPath; meta: ViewerMeta } | null = null;
let coarseTarget = 120_000;

class HttpError extends Error {
  constructor(readonly status: number) {
    super(`the server answered ${status}`);
  }
}

async function fetchBytes(url: string): Promise<{ bytes: Uint8Array; wire: number; waitMs: number }> {
  const res = await fetch(url, { credentials: "same-origin" });
  if (!res.ok) throw new HttpError(res.status);
  const bytes = new Uint8Array(await res.arrayBuffer());
  // bytes on the wire (compressed; next to nothing for a 304 from the cache), from this fetch's resource timing
  const entries = performance.getEntriesByName(res.url || new URL(url, self.location.href).href) as PerformanceResourceTiming[];
  const timing = entries.at(-1);
  const wire = timing ? timing.transferSize || timing.encodedBodySize : bytes.length;
  // how long the server took to start answering (the rest of the fetch is the transfer)
  const waitMs = timing ? timing.responseStart - timing.startTime : 0;
  performance.clearResourceTimings();
  return { bytes, wire, waitMs };
}

async function loadPath(req: PathRequest): Promise<{ path: ViewerPath; meta: ViewerMeta; report: LoadReport }> {
  const t0 = performance.now();
  let fallback: string | null = null;
  if (req.source === "route") {
    try {
      const { bytes, wire, waitMs } = await fetchBytes(`/api/revisions/${req.revisionId}/toolpath`);
      const t1 = performance.now();
      const data = decodeToolpath(bytes);
      return { ...data, report: { source: "route", wireBytes: wire, fetchMs: t1 - t0, waitMs, buildMs: performance.now() - t1, buffersMs: 0, fallback } };
    } catch (e) {
      // a refusal is final; anything else (a busy or failing server, a malformed answer) falls back to the file
      if (e instanceof HttpError && (e.status === 401 || e.status === 403 || e.status === 404)) throw e;
      fallback = e instanceof Error ? e.message : String(e);
    }
  }
  const t1 = performance.now();
  const { bytes, wire, waitMs } = req.bytes && !fallback ? { bytes: req.bytes, wire: 0, waitMs: 0 } : await fetchBytes(`/api/revisions/${req.revisionId}/file?purpose=view`);
  const t2 = performance.now();
  const data = viewerDataFromAnalysis(analyzeProgram(bytes, { ...req.options, segmentTimes: true }));
  return { ...data, report: { source: "bytes", wireBytes: wire, fetchMs: t2 - t1, waitMs, buildMs: performance.now() - t2, buffersMs: 0, fallback } };
}

/** `a` itself when it owns its whole buffer (so it can be handed over), else a copy that does. */
function own<T extends Uint32Array | Float32Array>(a: T): T {
  return (a.byteOffset === 0 && a.byteLength === a.buffer.byteLength ? a : a.slice()) as T;
}

/**
 * The page's buffers. Positions are copied (the worker keeps its own for comparisons); lines and times are handed
 * over, so the caller must not keep them.
 */
function pageBuffers(path: ViewerPath, meta: ViewerMeta): { buffers: PathBuffers; transfer: Transferable[] } {
  const positions = path.positions.slice();
  const vattr = vertexAttributes(path);
  const pauses = pausesOf(path);
  const line = own(path.line);
  const time = own(path.time);
  const boxes = offsetBoxes(path, meta.workOffsets.length, MotionKind.Jump).map((b) => ({ min: b.min, max: b.max }));
  return {
    buffers: { meta, positions, vattr, line, time, pauses, boxes },
    transfer: [positions.buffer, vattr.buffer, line.buffer, time.buffer, pauses.at.buffer, pauses.start.buffer],
  };
}

/** What the worker keeps of a path: positions and the columns the indices and the comparison read. */
const kept = (path: ViewerPath): ViewerPath => ({ ...path, line: new Uint32Array(0), time: new Float32Array(0), startTime: new Float32Array(0) });

const indexTransfer = (ix: StyleIndices): Transferable[] => {
  const list = [ix.cut.buffer, ix.rapid.buffer, ix.cutCoarse.buffer, ix.rapidCoarse.buffer];
  return Array.from(new Set(list));
};

scope.onmessage = async (e) => {
  const m = e.data;
  if (m.type === "load") {
    try {
      coarseTarget = m.coarseTarget;
      const { path, meta, report } = await loadPath(m.request);
      const t0 = performance.now();
      const indices = buildIndices(path, m.visibility, coarseTarget);
      current = { path: kept(path), meta };
      const { buffers, transfer } = pageBuffers(path, meta);
      report.buffersMs = performance.now() - t0;
      scope.postMessage({ type: "ready", buffers, indices, report }, [...transfer, ...indexTransfer(indices)]);
    } catch (err) {
      scope.postMessage({ type: "error", stage: "load", message: err instanceof Error ? err.message : String(err) });
    }
  } else if (m.type === "indices") {
    if (!current) return;
    const indices = buildIndices(current.path, m.visibility, coarseTarget);
    scope.postMessage({ type: "indices", seq: m.seq, indices }, indexTransfer(indices));
  } else if (m.type === "overlay") {
    try {
      if (!current) throw new Error("the revision is not loaded yet");
      const other = await loadPath(m.request);
      const diff = diffPaths(current, other, current.meta.chordTolerance);
      const { buffers, transfer } = pageBuffers(other.path, other.meta);
      const otherPairs = drawablePairs(other.path);
      const otherChanged = flaggedPairs(diff.bChanged);
      const changed = flaggedPairs(diff.aChanged);
      scope.postMessage(
        {
          type: "overlay",
          revisionId: m.request.revisionId,
          other: buffers,
          otherPairs,
          otherChanged,
          changed,
          changedCount: diff.aChangedCount,
          otherChangedCount: diff.bChangedCount,
        },
        [...transfer, otherPairs.buffer, otherChanged.buffer, changed.buffer],
      );
    } catch (err) {
      scope.postMessage({ type: "error", stage: "overlay", message: err instanceof Error ? err.message : String(err) });
    }
  }
};
