"use client";

import { useCallback, useEffect, useRef, useState } from "react";
import type { StyleIndices, Visibility } from "@/lib/viewer/render-buffers";
import type { FromWorker, LoadReport, OverlayResult, PathBuffers, PathRequest, ToWorker } from "./messages";


export type LoadState =
  | { state: "loading" }
  | { state: "ready"; buffers: PathBuffers; indices: StyleIndices; report: LoadReport }
  | { state: "error"; message: string };

/** Segments drawn while the view moves, about (SwiftShader draws some 100,000 in 100 ms on this class of CPU). */
export const COARSE_TARGET = 80_000;

/**
 * The backplot's worker: loads the revision's path once, rebuilds the indices when what is shown changes (the
 * newest request wins), and loads another revision to overlay. The worker ends with the component.
 */
export function usePathLoader(request: PathRequest | null, visibility: Visibility) {
  const worker = useRef<Worker | null>(null);
  const [load, setLoad] = useState<LoadState>({ state: "loading" });
  const [overlay, setOverlay] = useState<{ state: "idle" } | { state: "loading"; revisionId: number } | { state: "ready"; result: OverlayResult } | { state: "error"; message: string }>({ state: "idle" });
  const seq = useRef(0);
  const visibilityRef = useRef(visibility);
  visibilityRef.current = visibility;
  const key = request ? `${request.revisionId}|${request.source}` : "";

  useEffect(() => {
    if (!request) return;
    const w = new Worker(new URL("./viewer-worker.ts", import.meta.url), { type: "module" });
    worker.current = w;
    setLoad({ state: "loading" });
    w.onmessage = (e: MessageEvent<FromWorker>) => {
      const m = e.data;
      if (m.type === "ready") setLoad({ state: "ready", buffers: m.buffers, indices: m.indices, report: m.report });
      else if (m.type === "indices") {
        if (m.seq === seq.current) setLoad((s) => (s.state === "ready" ? { ...s, indices: m.indices } : s));
      } else if (m.type === "overlay") setOverlay({ state: "ready", result: m });
      else if (m.stage === "load") setLoad({ state: "error", message: m.message });
      else setOverlay({ state: "error", message: m.message });
    };
    w.onerror = () => setLoad({ state: "error", message: "the viewer's worker could not start in this browser" });
    const msg: ToWorker = { type: "load", request, visibility: visibilityRef.current, coarseTarget: COARSE_TARGET };
    w.postMessage(msg);
    return () => {
      w.terminate();
      worker.current = null;
    };
  }, [key]);

  // what is shown changed: new indices (skipped for the first load, which carries them)
  const visKey = `${Array.from(visibility.tools).join("")}|${Array.from(visibility.offsets).join("")}|${visibility.rapids}`;
  const firstVis = useRef(visKey);
  useEffect(() => {
    if (visKey === firstVis.current || !worker.current) return;
    firstVis.current = "";
    const msg: ToWorker = { type: "indices", seq: ++seq.current, visibility: visibilityRef.current };
    worker.current.postMessage(msg);
  }, [visKey]);

  const requestOverlay = useCallback((other: PathRequest | null) => {
    if (!other) return setOverlay({ state: "idle" });
    if (!worker.current) return;
    setOverlay({ state: "loading", revisionId: other.revisionId });
    const msg: ToWorker = { type: "overlay", request: other };
    worker.current.postMessage(msg);
  }, []);

  return { load, overlay, requestOverlay };
}
