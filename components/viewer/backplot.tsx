"use client";

/**
 * The 3D backplot of a revision: the panels (tools and offsets to show, colours, spaces, playback, overlay, measure,
 * help) around a react-three-fiber canvas that is loaded client-only. Linked with the revision page's code pane
 * through useRevisionWorkspace(): a selected line lights up its moves; a move picked here selects its line.
 */
import { useQuery } from "@tanstack/react-query";
import dynamic from "next/dynamic";
import Link from "next/link";
import { createContext, useCallback, useContext, useEffect, useMemo, useRef, useState, type KeyboardEvent, type ReactNode } from "react";
import { useRevisionWorkspace } from "@/components/vault/revision-workspace";
import type { AnalyzeOptions, Units } from "@/lib/gcode/types";
import { MotionKind } from "@/lib/gcode/types";
import { Box3, placeOffsets, travelBox, type EnteredOffset, type Xyz } from "@/lib/viewer/placement";
import { compactTimeline, formatClock, locate, segmentStart, type PlayState } from "@/lib/viewer/playback";
import { toolByte, type StyleIndices } from "@/lib/viewer/render-buffers";
import { ViewerController, type FrameInfo, type ViewPreset } from "./controller";
import type { ColorMode } from "./materials";
import type { PathBuffers, PathSource } from "./messages";
import * as C from "./palette";
import type { OverlayBuffers } from "./scene";
import { usePathLoader } from "./use-path-loader";

const Scene = dynamic(() => import("./scene"), {
  ssr: false,
  loading: () => <p className="p-4 text-sm text-ink-soft">Loading the 3D view…</p>,
});

export interface BackplotMachine {
  id: number;
  name: string;
  units: Units;
  travel: { x: { min: number; max: number }; y: { min: number; max: number }; z: { min: number; max: number } };
  manualToolChange: boolean;
}

export interface BackplotProps {
  revisionId: number;
  revisionNumber: number;
  /** The engine's options of this program on its machine (for building the path here when the route cannot). */
  options: AnalyzeOptions;
  machine: BackplotMachine;
  /** Work offset values set at the machine, as the page read them (refreshed from the API). */
  enteredOffsets: EnteredOffset[];
  /** The program's other revisions, for the overlay (newest first). */
  otherRevisions: { id: number; number: number; status: string }[];
  className?: string;
}

const SPEEDS = [1, 10, 60, 300, 1800] as const;
const speedLabel = (s: number) => (s < 60 ? `${s}×` : `${s / 60} min/s`);
const MAX_MARKERS = 300;
const NONE: never[] = [];

/** WebGL 2 in this browser: null until known (server render, first paint). */
function useWebGL2(): boolean | null {
  const [ok, setOk] = useState<boolean | null>(null);
  useEffect(() => {
    try {
      const c = document.createElement("canvas");
      setOk(!!c.getContext("webgl2"));
    } catch {
      setOk(false);
    }
  }, []);
  return ok;
}

function pathSource(): PathSource {
  // the bench measures the other way by asking for it; everyone else gets the route (DEVELOPERS.md)
  try {
    return window.localStorage.getItem("cyclegate.backplot.source") === "bytes" ? "bytes" : "route";
  } catch {
    return "route";
  }
}

export function Backplot(props: BackplotProps) {
  const webgl = useWebGL2();
  const shell = (body: ReactNode) => (
    <section aria-label="3D backplot" data-testid="backplot" className={`flex min-h-0 flex-col rounded-lg border border-rule bg-panel ${props.className ?? ""}`}>
      {body}
    </section>
  );
  if (webgl === false) {
    return shell(
      <div role="status" data-testid="backplot-no-webgl" className="m-auto max-w-md space-y-2 p-6 text-center">
        <h3 className="font-semibold">The 3D view cannot be drawn in this browser</h3>
        <p className="text-sm text-ink-soft">
          It needs WebGL 2, which is switched off or missing here. The code, the findings and the tool and work offset tables on this page are
          complete without it; turn on hardware acceleration or use another browser to see the toolpath.
        </p>
      </div>,
    );
  }
  if (webgl === null) return shell(<p className="p-4 text-sm text-ink-soft">Loading the 3D view…</p>);
  return <BackplotViewer {...props} />;
}

function BackplotViewer(props: BackplotProps) {
  const { revisionId, machine } = props;
  // fetch the 3D code while the path loads, not after
  useEffect(() => {
    performance.mark("backplot:start");
    void import("./scene");
  }, []);
  const { selection, selectLine } = useRevisionWorkspace();
  const [source] = useState<PathSource>(pathSource);
  // the "bytes" way takes the file the code pane downloads anyway (its query, observed without fetching again)
  const shared = useQuery<{ bytes: Uint8Array }>({ queryKey: ["revision-bytes", revisionId], enabled: false });
  const sharedBytes = source === "bytes" ? shared.data?.bytes : undefined;
  const request = useMemo(
    () => (source === "bytes" && !sharedBytes ? null : { revisionId, options: props.options, source, bytes: sharedBytes }),
    [revisionId, props.options, source, sharedBytes],
  );

  // ---- what is shown ----
  const [colorMode, setColorMode] = useState<ColorMode>("kind");
  const [machineSpace, setMachineSpace] = useState(false);
  const [rapids, setRapids] = useState(true);
  const [hiddenTools, setHiddenTools] = useState<ReadonlySet<number>>(new Set());
  const [hiddenOffsets, setHiddenOffsets] = useState<ReadonlySet<number>>(new Set());
  const visibility = useMemo(
    () => ({
      tools: Uint8Array.from({ length: 256 }, (_, i) => (hiddenTools.has(i) ? 0 : 1)),
      offsets: Uint8Array.from({ length: 256 }, (_, i) => (hiddenOffsets.has(i) ? 0 : 1)),
      rapids,
    }),
    [hiddenTools, hiddenOffsets, rapids],
  );
  const { load, overlay, requestOverlay } = usePathLoader(request, visibility);
  const ready = load.state === "ready" ? load : null;
  const buffers = ready?.buffers ?? null;
  const meta = buffers?.meta ?? null;

  // ---- machine space: the offsets as entered at the machine, kept fresh ----
  const offsetsQuery = useQuery({
    queryKey: ["work-offsets", machine.id],
    queryFn: async ({ signal }) => {
      const res = await fetch(`/api/machines/${machine.id}/work-offsets`, { signal, headers: { accept: "application/json" } });
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      return ((await res.json()) as { offsets: EnteredOffset[] }).offsets;
    },
    initialData: props.enteredOffsets,
    staleTime: 15_000,
  });
  const placement = useMemo(
    () => (meta ? placeOffsets(meta.workOffsets, offsetsQuery.data, machine.units, meta.units) : null),
    [meta, offsetsQuery.data, machine.units],
  );
  const travel = useMemo(() => (meta ? travelBox(machine.travel, machine.units, meta.units) : null), [meta, machine]);
  const boxes = useMemo(() => (buffers ? buffers.boxes.map((b) => Object.assign(new Box3(), { min: { ...b.min }, max: { ...b.max } })) : []), [buffers]);
  const offsetShown = useMemo(() => (meta ? meta.workOffsets.map((_, i) => !hiddenOffsets.has(i)) : []), [meta, hiddenOffsets]);

  // ---- the selected line's moves ----
  const highlight = useMemo(() => (buffers && selection ? pairsOfLine(buffers, selection.line) : null), [buffers, selection]);

  // ---- overlay of another revision ----
  const [overlayId, setOverlayId] = useState<number | null>(null);
  useEffect(() => {
    if (!ready) return;
    requestOverlay(overlayId === null ? null : { revisionId: overlayId, options: props.options, source });
  }, [overlayId, ready !== null, requestOverlay]);
  const overlayBuffers: OverlayBuffers | null = useMemo(() => {
    if (overlay.state !== "ready" || overlayId === null || overlay.result.revisionId !== overlayId) return null;
    const r = overlay.result;
    const otherPlace = placeOffsets(r.other.meta.workOffsets, offsetsQuery.data, machine.units, r.other.meta.units);
    return { other: r.other, otherPairs: r.otherPairs, otherChanged: r.otherChanged, changed: r.changed, otherOrigins: otherPlace.origins };
  }, [overlay, overlayId, offsetsQuery.data, machine.units]);

  // ---- measuring ----
  const [measuring, setMeasuring] = useState(false);
  const [measurePoints, setMeasurePoints] = useState<Xyz[]>([]);

  // ---- findings on the path ----
  const markers = useMemo(() => {
    if (!buffers || !meta) return [];
    const rank = { error: 0, warning: 1, info: 2 } as const;
    return meta.findings
      .map((f, i) => ({ f, i }))
      .filter(({ f }) => f.segment >= 0)
      .sort((a, b) => rank[a.f.severity] - rank[b.f.severity] || a.f.line - b.f.line)
      .slice(0, MAX_MARKERS)
      .map(({ f, i }) => {
        const v = (f.segment + (f.atEnd ? 1 : 0)) * 3;
        const p = buffers.positions;
        return { x: p[v]!, y: p[v + 1]!, z: p[v + 2]!, offset: buffers.vattr[(f.segment + 1) * 4 + 2]!, finding: f, index: i };
      });
  }, [buffers, meta]);
  // each placed offset's name at its zero (machine space), or one tag at part zero
  const zeroLabels = useMemo(() => {
    if (!meta || !placement) return [];
    if (!machineSpace) {
      const first = offsetShown.findIndex(Boolean);
      return first < 0 ? [] : [{ x: 0, y: 0, z: 0, offset: first, text: `part zero (${meta.workOffsets.map((o) => o.code).join(", ") || "G54"})` }];
    }
    return meta.workOffsets.flatMap((o, i) => (placement.origins[i] ? [{ x: 0, y: 0, z: 0, offset: i, text: o.code }] : []));
  }, [meta, placement, machineSpace, offsetShown]);
  const placed = useMemo(() => [...markers, ...zeroLabels], [markers, zeroLabels]);
  const [openFinding, setOpenFinding] = useState<number | null>(null);
  const [picked, setPicked] = useState<{ segment: number; point: Xyz } | null>(null);

  // ---- playback on the time estimate ----
  const controller = useMemo(() => new ViewerController(), []);
  useEffect(() => {
    // npm run bench:viewer times frames through this handle; nobody else gets it
    try {
      if (window.localStorage.getItem("cyclegate.backplot.bench") === "1") (window as unknown as { __cyclegateBackplot?: ViewerController }).__cyclegateBackplot = controller;
    } catch {
      // no storage: no bench
    }
  }, [controller]);
  const timeline = useMemo(() => (buffers ? compactTimeline(buffers.positions, buffers.time, buffers.pauses, buffers.vattr) : null), [buffers]);
  // the estimate's total: what runs after the last drawn move (a move from an unknown point, a last dwell) counts too
  const total = buffers && meta ? Math.max(meta.totalSeconds, buffers.time[buffers.time.length - 1] ?? 0) : 0;
  const [playing, setPlaying] = useState(false);
  const [speed, setSpeed] = useState<number>(60);
  const [playTime, setPlayTime] = useState<number | null>(null);
  const timeRef = useRef(0);
  const [status, setStatus] = useState<PlayState | null>(null);
  const lastLineSent = useRef({ line: 0, at: 0 });

  const applyTime = useCallback(
    (t: number, follow: "now" | "throttled" | "no") => {
      if (!timeline || !buffers) return;
      const clamped = Math.min(Math.max(t, 0), total);
      timeRef.current = clamped;
      const s = locate(timeline, clamped);
      const seg = Math.min(s.segment, timeline.segmentCount - 1);
      controller.play = { active: true, segment: s.segment, x: s.x, y: s.y, z: s.z, offset: seg >= 0 ? buffers.vattr[(seg + 1) * 4 + 2]! : 0 };
      controller.invalidate();
      setStatus(s);
      setPlayTime(clamped);
      if (follow !== "no" && seg >= 0) {
        const line = buffers.line[seg]!;
        const now = performance.now();
        if (line !== lastLineSent.current.line && (follow === "now" || now - lastLineSent.current.at > 400)) {
          lastLineSent.current = { line, at: now };
          selectLine(line, "backplot");
        }
      }
    },
    [timeline, buffers, total, controller, selectLine],
  );

  useEffect(() => {
    // on pause the code pane catches up with the tool at once (while playing it follows every 400 ms)
    if (!playing) {
      if (timeRef.current > 0) applyTime(timeRef.current, "now");
      return;
    }
    let raf = 0;
    let last = performance.now();
    const step = (now: number) => {
      const dt = (now - last) / 1000;
      last = now;
      const t = timeRef.current + dt * speed;
      applyTime(t, "throttled");
      if (t >= total) {
        setPlaying(false);
        return;
      }
      raf = requestAnimationFrame(step);
    };
    raf = requestAnimationFrame(step);
    return () => cancelAnimationFrame(raf);
  }, [playing, speed, total, applyTime]);

  const stepSegment = (dir: 1 | -1) => {
    if (!timeline || !status) return applyTime(0, "now");
    const n = timeline.segmentCount;
    // to the end of this move (forwards) or the start of the one before (backwards), skipping moves that take no time
    let i = Math.min(status.segment, n - 1);
    if (dir > 0) {
      const t = timeline.time[i]!;
      applyTime(t > timeRef.current + 1e-6 ? t : timeline.time[Math.min(i + 1, n - 1)]!, "now");
    } else {
      while (i > 0 && segmentStart(timeline, i) >= timeRef.current - 1e-6) i--;
      applyTime(segmentStart(timeline, i), "now");
    }
  };

  const stopPlayback = () => {
    timeRef.current = 0;
    setPlaying(false);
    setPlayTime(null);
    setStatus(null);
    controller.play = { ...controller.play, active: false };
    controller.invalidate();
  };

  // ---- the first frames (for the page and the bench) ----
  const [drawn, setDrawn] = useState<{ first: FrameInfo; full: FrameInfo | null } | null>(null);
  const onFrame = useCallback((info: FrameInfo) => {
    performance.mark(info.coarse ? "backplot:coarse-frame" : "backplot:full-frame", { detail: info });
    setDrawn((d) => (d === null ? { first: info, full: info.coarse ? null : info } : d.full || info.coarse ? d : { ...d, full: info }));
  }, []);
  useEffect(() => {
    if (ready) performance.mark("backplot:data", { detail: ready.report });
  }, [ready]);
  const [gridSpacing, setGridSpacing] = useState(0);

  const markerLayer = useRef<HTMLDivElement>(null);
  const root = useRef<HTMLElement>(null);
  const [help, setHelp] = useState(false);
  // the legend starts open where it leaves the path room (a wide view), closed on a narrow one
  const [legendOpen, setLegendOpen] = useState(true);
  useEffect(() => {
    if ((root.current?.clientWidth ?? 1000) < 520) setLegendOpen(false);
  }, []);

  const onPick = useCallback(
    (hit: { segment: number; point: Xyz } | null) => {
      if (!buffers) return;
      if (measuring) {
        if (!hit) return;
        setMeasurePoints((pts) => (pts.length >= 2 ? [hit.point] : [...pts, hit.point]));
        return;
      }
      setPicked(hit);
      setOpenFinding(null);
      if (hit) selectLine(buffers.line[hit.segment]!, "backplot");
    },
    [buffers, measuring, selectLine],
  );

  const view = (preset: ViewPreset) => controller.setView(preset);
  const cycleColor = () => setColorMode((m) => (m === "kind" ? "tool" : m === "tool" ? "offset" : "kind"));
  const previous = props.otherRevisions.find((r) => r.number < props.revisionNumber) ?? props.otherRevisions[0];

  const onKeyDown = (e: KeyboardEvent) => {
    if (e.altKey || e.ctrlKey || e.metaKey || (e.target as HTMLElement).closest("input, select, textarea")) return;
    const k = e.key;
    const act: Record<string, () => void> = {
      t: () => view("top"),
      f: () => view("front"),
      s: () => view("side"),
      i: () => view("iso"),
      z: () => controller.fit(),
      "0": () => controller.fit(),
      c: cycleColor,
      r: () => setRapids((r) => !r),
      m: () => setMachineSpace((m) => !m),
      d: () => {
        setMeasuring((v) => !v);
        setMeasurePoints([]);
      },
      o: () => previous && setOverlayId((id) => (id === null ? previous.id : null)),
      " ": () => (playing ? setPlaying(false) : (playTime ?? 0) >= total ? (applyTime(0, "now"), setPlaying(true)) : setPlaying(true)),
      ArrowRight: () => stepSegment(1),
      ArrowLeft: () => stepSegment(-1),
      Home: () => applyTime(0, "now"),
      End: () => applyTime(total, "now"),
      "]": () => setSpeed((s) => SPEEDS[Math.min(SPEEDS.length - 1, SPEEDS.indexOf(s as (typeof SPEEDS)[number]) + 1)]!),
      "[": () => setSpeed((s) => SPEEDS[Math.max(0, SPEEDS.indexOf(s as (typeof SPEEDS)[number]) - 1)]!),
      "?": () => setHelp((h) => !h),
      h: () => setHelp((h) => !h),
      Escape: () => {
        setHelp(false);
        setMeasurePoints([]);
        setMeasuring(false);
        setOpenFinding(null);
        setPicked(null);
      },
    };
    const fn = act[k.length === 1 ? k.toLowerCase() : k] ?? act[k];
    if (!fn) return;
    e.preventDefault();
    fn();
  };

  const toolsInUse = meta?.tools ?? [];
  const segCount = buffers?.time.length ?? 0;
  const playSeg = status ? Math.min(status.segment, segCount - 1) : -1;
  const toolIndexAt = (seg: number) => (buffers && seg >= 0 ? buffers.vattr[(seg + 1) * 4 + 1]! : 255);
  const toolLabel = (byte: number) => (byte === 255 || !meta ? "no tool" : `T${meta.tools[byte]?.number ?? "?"}`);
  const offsetLabel = (seg: number) => (buffers && meta && seg >= 0 ? (meta.workOffsets[buffers.vattr[(seg + 1) * 4 + 2]!]?.code ?? "") : "");
  const pauseText =
    status?.phase === "pause"
      ? status.pause === "tool-change"
        ? `${machine.manualToolChange ? "Tool change by hand: insert" : "Tool change to"} ${toolLabel(toolIndexAt(status.segment))}${meta?.tools[toolIndexAt(status.segment)]?.description ? ` (${meta.tools[toolIndexAt(status.segment)]!.description})` : ""}`
        : "Waiting: a dwell or moves that are not drawn"
      : null;

  const unknownInMachine = machineSpace && placement ? placement.unknown : [];
  const measured = measurePoints.length === 2 ? distance(measurePoints[0]!, measurePoints[1]!) : null;
  const openF = openFinding !== null && meta ? meta.findings[openFinding] : null;
  const u = meta?.units ?? "mm";
  const fmtLen = (v: number) => `${v.toFixed(u === "inch" ? 4 : 3)}`;

  return (
    <section
      ref={root}
      aria-label="3D backplot"
      data-testid="backplot"
      data-state={load.state}
      data-drawn={drawn ? "1" : undefined}
      data-full-drawn={drawn?.full ? "1" : undefined}
      data-source={ready?.report.source}
      data-segments={buffers?.time.length}
      data-buffer-bytes={ready ? bufferBytes(ready.buffers, ready.indices) : undefined}
      data-color-mode={colorMode}
      data-space={machineSpace ? "machine" : "part"}
      className={`flex min-h-0 flex-col overflow-hidden rounded-lg border border-rule bg-panel ${props.className ?? ""}`}
    >
      <div className="space-y-1 border-b border-rule px-2 py-1.5 text-xs">
        <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
          <h3 className="mr-1 text-sm font-semibold">3D backplot</h3>
          <Group label="View">
            {(["top", "front", "side", "iso"] as const).map((p) => (
              <Btn key={p} onClick={() => view(p)} title={`${p[0]!.toUpperCase()}${p.slice(1)} view (${p[0]!.toUpperCase()})`}>
                {p[0]!.toUpperCase() + p.slice(1)}
              </Btn>
            ))}
            <Btn onClick={() => controller.fit()} title="Fit the path in the view (Z)">Fit</Btn>
          </Group>
          <span className="ml-auto flex gap-1">
            <Btn onClick={() => setHelp(true)} title="Keyboard shortcuts and gestures (?)" testId="help">?</Btn>
            <Btn onClick={() => (document.fullscreenElement ? document.exitFullscreen() : root.current?.requestFullscreen())} title="Full screen">
              Full screen
            </Btn>
          </span>
        </div>
        <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
          <label className="flex items-center gap-1">
            <span className="text-ink-soft">Colour by</span>
            <select value={colorMode} onChange={(e) => setColorMode(e.target.value as ColorMode)} className="rounded border border-rule px-1 py-1" data-testid="color-mode">
              <option value="kind">motion</option>
              <option value="tool">tool</option>
              <option value="offset">work offset</option>
            </select>
          </label>
          <Group label="Space">
            <Btn pressed={!machineSpace} onClick={() => setMachineSpace(false)} title="Every part on its own zero, as posted (M)" testId="part-space">Part</Btn>
            <Btn pressed={machineSpace} onClick={() => setMachineSpace(true)} title="Parts at their work offsets in the machine's travel (M)" testId="machine-space">Machine</Btn>
          </Group>
          <Btn pressed={rapids} onClick={() => setRapids((r) => !r)} title="Show rapids (R)">Rapids</Btn>
          <Btn pressed={measuring} onClick={() => { setMeasuring((m) => !m); setMeasurePoints([]); }} title="Measure between two picked points (D)" testId="measure">Measure</Btn>
          {props.otherRevisions.length > 0 && (
            <label className="flex items-center gap-1">
              <span className="text-ink-soft">Overlay</span>
              <select
                value={overlayId ?? ""}
                onChange={(e) => setOverlayId(e.target.value ? Number(e.target.value) : null)}
                className="max-w-40 rounded border border-rule px-1 py-1"
                data-testid="overlay-select"
              >
                <option value="">none</option>
                {props.otherRevisions.map((r) => (
                  <option key={r.id} value={r.id}>
                    revision {r.number} ({r.status})
                  </option>
                ))}
              </select>
            </label>
          )}
        </div>
      </div>

      <div className="relative min-h-0 flex-1 bg-[#1c2430] outline-none focus-visible:ring-2" tabIndex={0} onKeyDown={onKeyDown} data-testid="backplot-stage" aria-label="3D view; press ? for the keyboard shortcuts">
        {load.state === "error" ? (
          <p role="alert" className="p-4 text-sm text-red-200">
            The toolpath could not be loaded ({load.message}). The code and the checks on this page are not affected.
          </p>
        ) : (
          <Scene
            buffers={buffers}
            indices={ready?.indices ?? null}
            colorMode={colorMode}
            machineSpace={machineSpace}
            origins={placement?.origins ?? NONE}
            boxes={boxes}
            offsetShown={offsetShown}
            travel={travel}
            safeZ={meta?.safeZ ?? 0}
            units={u}
            highlight={highlight}
            overlay={overlayBuffers}
            measurePoints={measurePoints}
            markers={placed}
            markerLayer={markerLayer}
            controller={controller}
            onPick={onPick}
            onFrame={onFrame}
            onGrid={setGridSpacing}
          />
        )}
        {load.state === "loading" && (
          <p role="status" className="absolute inset-x-0 top-1/2 text-center text-sm text-slate-300">
            Loading the toolpath…
          </p>
        )}

        {/* findings at their place on the path (positioned by the scene after every frame) */}
        <div ref={markerLayer} className="pointer-events-none absolute inset-0 overflow-hidden">
          {markers.map((m, k) => (
            <button
              key={m.index}
              type="button"
              data-marker={k}
              data-testid="finding-marker"
              data-line={m.finding.line}
              data-severity={m.finding.severity}
              aria-label={`${m.finding.severity} on line ${m.finding.line}: ${m.finding.message}`}
              title={`Line ${m.finding.line}: ${m.finding.message}`}
              onClick={() => {
                setOpenFinding(m.index);
                setPicked(null);
                selectLine(m.finding.line, "finding");
              }}
              className={`pointer-events-auto absolute top-0 left-0 -mt-2.5 -ml-2.5 flex size-5 items-center justify-center rounded-full border-2 border-white text-[11px] font-bold text-white shadow ${
                m.finding.severity === "error" ? "bg-[#e5484d]" : m.finding.severity === "warning" ? "bg-[#d98a0b]" : "bg-[#3e8ef7]"
              }`}
              style={{ display: "none" }}
            >
              !
            </button>
          ))}
          {zeroLabels.map((l, k) => (
            <span
              key={`zero-${l.offset}-${l.text}`}
              data-marker={markers.length + k}
              data-testid="zero-label"
              className="absolute top-0 left-0 mt-1 ml-1 rounded bg-black/60 px-1 text-[10px] whitespace-nowrap text-slate-200"
              style={{ display: "none" }}
            >
              {l.text}
            </span>
          ))}
        </div>

        {meta && legendOpen && (
          <Legend
            meta={meta}
            colorMode={colorMode}
            hiddenTools={hiddenTools}
            hiddenOffsets={hiddenOffsets}
            onTool={(i) => setHiddenTools((s) => toggled(s, i))}
            onOffset={(i) => setHiddenOffsets((s) => toggled(s, i))}
            gridSpacing={gridSpacing}
            units={u}
            overlay={overlayBuffers ? { changed: overlay.state === "ready" ? overlay.result.changedCount : 0, before: overlay.state === "ready" ? overlay.result.otherChangedCount : 0 } : null}
            placement={machineSpace ? placement : null}
            onClose={() => setLegendOpen(false)}
          />
        )}
        {meta && !legendOpen && (
          <button type="button" onClick={() => setLegendOpen(true)} className="absolute top-2 left-2 rounded bg-black/50 px-2 py-1 text-xs text-white">
            Legend
          </button>
        )}

        <div className="pointer-events-none absolute right-2 bottom-2 left-2 flex flex-col items-end gap-1 text-xs">
          {unknownInMachine.length > 0 && (
            <p className="pointer-events-auto rounded bg-black/70 px-2 py-1 text-amber-200" data-testid="origin-unknown">
              No origin known for {unknownInMachine.join(", ")} at {machine.name}: not drawn in machine space.{" "}
              <Link href={`/machines/${machine.id}`} className="underline">Set the values at the machine</Link>.
            </p>
          )}
          {overlay.state === "loading" && <p className="rounded bg-black/70 px-2 py-1 text-slate-200">Loading the other revision…</p>}
          {overlay.state === "error" && <p className="rounded bg-black/70 px-2 py-1 text-red-200">The other revision could not be loaded ({overlay.message}).</p>}
          {measuring && (
            <p className="pointer-events-auto rounded bg-black/70 px-2 py-1 text-cyan-100" data-testid="measure-readout">
              {measured
                ? `Distance ${fmtLen(measured.d)} ${u} (ΔX ${fmtLen(measured.dx)} ΔY ${fmtLen(measured.dy)} ΔZ ${fmtLen(measured.dz)})`
                : measurePoints.length === 1
                  ? "Pick the second point on the path."
                  : "Measuring: pick two points on the path."}
            </p>
          )}
          {openF && (
            <div className="pointer-events-auto max-w-sm rounded bg-black/80 px-3 py-2 text-slate-100" role="status" data-testid="finding-card">
              <p className="font-semibold">
                {openF.severity === "error" ? "Error" : openF.severity === "warning" ? "Warning" : "Note"} on line {openF.line}
              </p>
              <p>{openF.message}</p>
              {openF.hint && <p className="text-slate-300">{openF.hint}</p>}
              <code className="text-slate-400">{openF.rule}</code>
            </div>
          )}
          {picked && buffers && meta && !measuring && (
            <p className="pointer-events-auto rounded bg-black/70 px-2 py-1 text-slate-100" data-testid="picked">
              Line {buffers.line[picked.segment]} · {kindName(buffers.vattr[(picked.segment + 1) * 4]!)} · {toolLabel(toolIndexAt(picked.segment))} · {offsetLabel(picked.segment)} · at X
              {fmtLen(picked.point.x)} Y{fmtLen(picked.point.y)} Z{fmtLen(picked.point.z)}
            </p>
          )}
        </div>

        {help && <HelpOverlay onClose={() => setHelp(false)} />}
      </div>

      <div className="flex flex-wrap items-center gap-x-3 gap-y-1 border-t border-rule px-3 py-2 text-sm" data-testid="playback">
        <Btn
          onClick={() => {
            if (playing) return setPlaying(false);
            if ((playTime ?? 0) >= total) applyTime(0, "now");
            else if (playTime === null) applyTime(0, "now");
            setPlaying(true);
          }}
          title="Play or pause on the time estimate (space)"
          testId="play"
          disabled={!buffers || total <= 0}
        >
          {playing ? "Pause" : "Play"}
        </Btn>
        <Btn onClick={() => stepSegment(-1)} title="One move back (←)" disabled={!buffers}>‹</Btn>
        <Btn onClick={() => stepSegment(1)} title="One move on (→)" disabled={!buffers}>›</Btn>
        <input
          type="range"
          min={0}
          max={total || 1}
          step="any"
          value={playTime ?? 0}
          onChange={(e) => applyTime(Number(e.target.value), "now")}
          aria-label="Time in the program"
          data-testid="scrubber"
          disabled={!buffers || total <= 0}
          className="min-w-32 flex-1 accent-[#ff3ec9]"
        />
        <label className="flex items-center gap-1">
          <span className="sr-only">Speed</span>
          <select value={speed} onChange={(e) => setSpeed(Number(e.target.value))} className="rounded border border-rule px-1 py-1" title="Playback speed ([ and ])">
            {SPEEDS.map((s) => (
              <option key={s} value={s}>
                {speedLabel(s)}
              </option>
            ))}
          </select>
        </label>
        {playTime !== null && (
          <Btn onClick={stopPlayback} title="Show the whole path again">Whole path</Btn>
        )}
        <p className="w-full text-xs text-ink-soft tabular-nums" aria-live="off" data-testid="play-status">
          {status && buffers && meta ? (
            <>
              <span data-testid="play-elapsed">{formatClock(playTime ?? 0)}</span> of {formatClock(total)} (
              <span data-testid="play-remaining">{formatClock(total - (playTime ?? 0))}</span> left) · line{" "}
              <span data-testid="play-line">{playSeg >= 0 ? buffers.line[playSeg] : "—"}</span> · {toolLabel(toolIndexAt(playSeg))} · {offsetLabel(playSeg)}
              {pauseText && (
                <strong className="ml-2 text-[#b3167f]" data-testid="play-pause">
                  {pauseText}
                </strong>
              )}
            </>
          ) : buffers && meta ? (
            <>
              Run time estimate {formatClock(total)} · {segCount.toLocaleString("en")} moves · {toolsInUse.length} tools
              {ready && <> · path {formatBytes(ready.report.wireBytes)}</>}
              {meta.truncated && <strong className="ml-2 text-bad">The path is cut short (over the engine&apos;s limit).</strong>}
            </>
          ) : (
            "Playback follows the time estimate once the path is in."
          )}
        </p>
      </div>
    </section>
  );
}

/** Bytes of the typed arrays the page keeps for the path (each buffer once). */
function bufferBytes(b: PathBuffers, ix: StyleIndices): number {
  const arrays = [b.positions, b.vattr, b.line, b.time, b.pauses.at, b.pauses.start, ix.cut, ix.rapid, ix.cutCoarse, ix.rapidCoarse];
  return Array.from(new Set(arrays.map((a) => a.buffer))).reduce((n, buf) => n + buf.byteLength, 0);
}

function toggled(s: ReadonlySet<number>, i: number): ReadonlySet<number> {
  const n = new Set(s);
  if (n.has(i)) n.delete(i);
  else n.add(i);
  return n;
}

function distance(a: Xyz, b: Xyz) {
  const dx = b.x - a.x, dy = b.y - a.y, dz = b.z - a.z;
  return { dx, dy, dz, d: Math.hypot(dx, dy, dz) };
}

const kindName = (k: number) => C.KIND_NAMES[k] ?? "move";

function formatBytes(n: number): string {
  return n >= 1e6 ? `${(n / 1e6).toFixed(1)} MB` : n >= 1e3 ? `${(n / 1e3).toFixed(0)} kB` : `${n} B`;
}

/** Vertex pairs of the drawn moves of one line (kinds from the per-vertex bytes). */
function pairsOfLine(b: PathBuffers, line: number): Uint32Array {
  const n = b.line.length;
  const out: number[] = [];
  for (let i = 0; i < n && out.length < 400_000; i++) {
    if (b.line[i] === line && b.vattr[(i + 1) * 4] !== MotionKind.Jump) out.push(i, i + 1);
  }
  return Uint32Array.from(out);
}

const InGroup = createContext(false);

function Group({ label, children }: { label: string; children: ReactNode }) {
  return (
    <span role="group" aria-label={label} className="flex overflow-hidden rounded border border-rule">
      <InGroup.Provider value={true}>{children}</InGroup.Provider>
    </span>
  );
}

function Btn({
  children,
  onClick,
  title,
  pressed,
  testId,
  disabled,
}: {
  children: ReactNode;
  onClick: () => void;
  title: string;
  pressed?: boolean;
  testId?: string;
  disabled?: boolean;
}) {
  const grouped = useContext(InGroup);
  return (
    <button
      type="button"
      onClick={onClick}
      title={title}
      aria-pressed={pressed}
      data-testid={testId}
      disabled={disabled}
      className={`min-h-7 px-2 py-0.5 disabled:opacity-50 ${pressed ? "bg-brand text-white" : "bg-panel hover:bg-paper"} ${
        grouped ? "border-rule not-first:border-l" : "rounded border border-rule"
      }`}
    >
      {children}
    </button>
  );
}

function Swatch({ color, dotted }: { color: string; dotted?: boolean }) {
  return (
    <span
      aria-hidden
      className="inline-block h-1 w-5 shrink-0 rounded-sm"
      style={dotted ? { backgroundImage: `repeating-linear-gradient(90deg, ${color} 0 3px, transparent 3px 6px)` } : { backgroundColor: color }}
    />
  );
}

function Legend(p: {
  meta: NonNullable<PathBuffers["meta"]>;
  colorMode: ColorMode;
  hiddenTools: ReadonlySet<number>;
  hiddenOffsets: ReadonlySet<number>;
  onTool: (i: number) => void;
  onOffset: (i: number) => void;
  gridSpacing: number;
  units: Units;
  overlay: { changed: number; before: number } | null;
  placement: ReturnType<typeof placeOffsets> | null;
  onClose: () => void;
}) {
  const kinds = [MotionKind.Feed, MotionKind.Arc, MotionKind.CycleFeed, MotionKind.Rapid, MotionKind.CycleRapid, MotionKind.Machine];
  const rapid = (k: number) => k === MotionKind.Rapid || k === MotionKind.CycleRapid || k === MotionKind.Machine;
  return (
    <div className="absolute top-2 left-2 max-h-[calc(100%-1rem)] w-52 overflow-y-auto rounded bg-black/60 p-2 text-[11px] leading-4 text-slate-100" data-testid="legend">
      <div className="mb-1 flex items-center justify-between">
        <span className="font-semibold">Legend</span>
        <button type="button" onClick={p.onClose} className="rounded px-1 hover:bg-white/10" aria-label="Hide the legend">
          ×
        </button>
      </div>
      {p.colorMode === "kind" && (
        <ul className="mb-2 space-y-0.5">
          {kinds.map((k) => (
            <li key={k} className="flex items-center gap-2" data-legend-kind={k} data-color={C.KIND_COLORS[k]}>
              <Swatch color={C.KIND_COLORS[k]!} dotted={rapid(k)} /> {C.KIND_NAMES[k]}
            </li>
          ))}
        </ul>
      )}
      <fieldset className="mb-2">
        <legend className="font-semibold text-slate-300">Tools</legend>
        {p.meta.tools.map((t, i) => (
          <label key={i} className="flex items-center gap-2" data-legend-tool={t.number} data-color={C.seriesColor(toolByte(i))}>
            <input type="checkbox" checked={!p.hiddenTools.has(toolByte(i))} onChange={() => p.onTool(toolByte(i))} aria-label={`Show T${t.number}`} />
            {p.colorMode === "tool" && <Swatch color={C.seriesColor(toolByte(i))} />}
            <span className="truncate" title={t.description ?? undefined}>
              T{t.number}
              {t.description ? ` ${t.description}` : ""}
            </span>
          </label>
        ))}
        {p.meta.tools.length === 0 && <p className="text-slate-400">No tool change in the program.</p>}
      </fieldset>
      <fieldset className="mb-2">
        <legend className="font-semibold text-slate-300">Work offsets</legend>
        {p.meta.workOffsets.map((o, i) => (
          <label key={o.code} className="flex items-center gap-2" data-legend-offset={o.code} data-color={C.seriesColor(i)}>
            <input type="checkbox" checked={!p.hiddenOffsets.has(i)} onChange={() => p.onOffset(i)} aria-label={`Show ${o.code}`} />
            {p.colorMode === "offset" && <Swatch color={C.seriesColor(i)} />}
            <span>{o.code}</span>
            {p.placement && (
              <span className="ml-auto text-slate-400">
                {p.placement.sources[i] === "program" ? "set by the program" : p.placement.sources[i] === "machine" ? "at the machine" : "not known"}
              </span>
            )}
          </label>
        ))}
      </fieldset>
      <ul className="space-y-0.5 text-slate-300">
        <li className="flex items-center gap-2">
          <Swatch color={C.SELECTED} /> selected line
        </li>
        <li className="flex items-center gap-2">
          <Swatch color={C.SAFE_Z} /> safe Z {p.meta.safeZ} {p.units}
        </li>
        {p.overlay && (
          <>
            <li className="flex items-center gap-2" data-color={C.CHANGED}>
              <Swatch color={C.CHANGED} /> changed in this revision ({p.overlay.changed.toLocaleString("en")})
            </li>
            <li className="flex items-center gap-2">
              <Swatch color={C.OTHER_REVISION} dotted /> where it was ({p.overlay.before.toLocaleString("en")})
            </li>
          </>
        )}
        {p.gridSpacing > 0 && (
          <li data-testid="grid-spacing">
            Grid squares {Number(p.gridSpacing.toPrecision(3))} {p.units}
          </li>
        )}
      </ul>
    </div>
  );
}

const SHORTCUTS: [string, string][] = [
  ["T F S I", "top, front, side, iso view"],
  ["Z or 0", "fit the path in the view"],
  ["C", "colour by motion, tool, work offset"],
  ["R", "rapids on or off"],
  ["M", "part space or machine space"],
  ["D", "measure between two picked points"],
  ["O", "overlay the previous revision on or off"],
  ["Space", "play or pause"],
  ["← →", "one move back or on"],
  ["Home End", "program start or end"],
  ["[ ]", "slower or faster"],
  ["? or H", "this help"],
  ["Esc", "close, clear the measurement"],
];

function HelpOverlay({ onClose }: { onClose: () => void }) {
  return (
    <div role="dialog" aria-modal="false" aria-label="Keyboard shortcuts" data-testid="backplot-help" className="absolute inset-4 overflow-y-auto rounded bg-black/85 p-4 text-sm text-slate-100">
      <div className="mb-2 flex items-center justify-between">
        <h4 className="font-semibold">Keyboard and gestures</h4>
        <button type="button" onClick={onClose} className="rounded border border-slate-500 px-2 py-0.5">
          Close
        </button>
      </div>
      <p className="mb-2 text-slate-300">Click the 3D view first, then:</p>
      <table className="mb-3">
        <tbody>
          {SHORTCUTS.map(([k, v]) => (
            <tr key={k}>
              <td className="pr-4 font-mono whitespace-nowrap text-cyan-200">{k}</td>
              <td>{v}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-slate-300">
        Mouse: drag to turn, right-drag to pan, wheel to zoom at the pointer; click a move to select its line in the code. Touch: one finger
        turns, two fingers pinch to zoom and move to pan; tap a move to select its line.
      </p>
    </div>
  );
}
