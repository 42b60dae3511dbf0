"use client";

/**
 * The 3D scene of the backplot: a react-three-fiber canvas (loaded client-only by backplot.tsx) with one geometry
 * per style built once from the worker's typed arrays, drawn as lineSegments; the grid, the safe-Z planes, each
 * offset's zero, the travel box, the tool in playback, the selected line, the overlay and the measuring line.
 *
 * It renders only on demand (a still view costs nothing) and by its own hand (useFrame at priority 1), so it can
 * draw a coarse index while the view moves and the full path once it rests, reveal playback with drawRange, and
 * place the finding markers (plain DOM buttons over the canvas) after each frame. Picking renders the path's vertex
 * numbers into a few pixels around the pointer and reads them back: no work per segment on the page's thread.
 */
import { OrbitControls } from "@react-three/drei";
import { Canvas, useFrame, useThree } from "@react-three/fiber";
import { useEffect, useMemo, useRef, type RefObject } from "react";
import * as THREE from "three";
import type { OrbitControls as OrbitControlsImpl } from "three-stdlib";
import type { StyleIndices } from "@/lib/viewer/render-buffers";
import { pairsDone } from "@/lib/viewer/playback";
import type { Box3, Xyz } from "@/lib/viewer/placement";
import type { FrameInfo, ViewerController, ViewPreset } from "./controller";
import { originTexture, paletteTexture, pathMaterial, setColorMode, setMachineSpace, setOrigins, type ColorMode } from "./materials";
import type { PathBuffers } from "./messages";
import * as C from "./palette";

export interface OverlayBuffers {
  other: PathBuffers;
  otherPairs: Uint32Array;
  otherChanged: Uint32Array;
  changed: Uint32Array;
  /** Origins of the other revision's offsets (by its own offset index), machine space. */
  otherOrigins: (Xyz | null)[];
}

/** A marker over the canvas: a DOM element placed at a point of the path after every frame. */
export interface MarkerPlacement {
  /** Part coordinates and the work offset they belong to. */
  x: number;
  y: number;
  z: number;
  offset: number;
}

export interface SceneProps {
  buffers: PathBuffers;
  indices: StyleIndices;
  colorMode: ColorMode;
  machineSpace: boolean;
  /** Per offset index: its origin in machine space (null: not placed, not drawn there). */
  origins: (Xyz | null)[];
  /** Per offset index: the part's box (part coordinates), for the safe-Z planes and the view's fit. */
  boxes: Box3[];
  offsetShown: boolean[];
  /** The machine's travel (machine space only). */
  travel: { min: Xyz; max: Xyz } | null;
  safeZ: number;
  units: "mm" | "inch";
  /** Vertex pairs of the selected line's moves. */
  highlight: Uint32Array | null;
  overlay: OverlayBuffers | null;
  measurePoints: Xyz[];
  markers: MarkerPlacement[];
  markerLayer: RefObject<HTMLDivElement | null>;
  controller: ViewerController;
  /** A click on the path (not a drag): the segment and the point on it (in the space shown). */
  onPick: (hit: { segment: number; point: Xyz } | null) => void;
  onFrame: (info: FrameInfo) => void;
  onGrid: (spacing: number) => void;
}

/** The canvas comes up with the page (the WebGL context is ready before the path is); the path when it is in. */
export default function Scene(props: Omit<SceneProps, "buffers" | "indices"> & { buffers: PathBuffers | null; indices: StyleIndices | null }) {
  const { buffers, indices } = props;
  return (
    <Canvas
      orthographic
      flat
      frameloop="demand"
      dpr={[1, 2]}
      gl={{ antialias: false, preserveDrawingBuffer: true, powerPreference: "high-performance" }}
      camera={{ position: [0, -2000, 2000], up: [0, 0, 1], zoom: 1, near: 0.1, far: 1e7 }}
      onCreated={({ gl, camera }) => {
        gl.setClearColor(C.BACKGROUND, 1);
        camera.up.set(0, 0, 1);
      }}
      data-testid="backplot-canvas"
      aria-label="3D view of the toolpath"
      role="img"
    >
      {/* before the path is in, an empty one: the shaders compile and the buffers upload while it loads */}
      <SceneContent {...props} buffers={buffers ?? EMPTY_BUFFERS} indices={indices ?? EMPTY_INDICES} />
    </Canvas>
  );
}

const STILL_AFTER_MS = 220;

const EMPTY_BUFFERS: PathBuffers = {
  meta: {
    engineVersion: 0,
    units: "mm",
    lineCount: 0,
    chordTolerance: 0.01,
    safeZ: 0,
    totalSeconds: 0,
    bounds: { min: { x: null, y: null, z: null }, max: { x: null, y: null, z: null } },
    tools: [],
    workOffsets: [],
    findings: [],
    truncated: false,
  },
  positions: new Float32Array(6),
  vattr: new Uint8Array(8),
  line: new Uint32Array(0),
  time: new Float32Array(0),
  pauses: { at: new Uint32Array(0), start: new Float32Array(0) },
  boxes: [],
};
const NO_PAIRS = new Uint32Array(0);
const EMPTY_INDICES: StyleIndices = { cut: NO_PAIRS, rapid: NO_PAIRS, cutCoarse: NO_PAIRS, rapidCoarse: NO_PAIRS, shown: 0, step: 1 };

function SceneContent(p: SceneProps) {
  const { gl, camera, size, invalidate, scene } = useThree();
  const controls = useRef<OrbitControlsImpl | null>(null);
  const interacting = useRef(false);
  const stillTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const framesSignalled = useRef(0);
  const toolRef = useRef<THREE.Group>(null);
  const props = useRef(p);
  props.current = p;

  // ---- shared textures and materials (made once) ----
  const mats = useMemo(() => {
    const palette = paletteTexture();
    const origins = originTexture();
    const otherOrigins = originTexture();
    return {
      palette,
      origins,
      otherOrigins,
      cut: pathMaterial({ palette, origins }),
      rapid: pathMaterial({ palette, origins, dotted: true }),
      pick: pathMaterial({ palette, origins, pick: true }),
      selected: pathMaterial({ palette, origins, fixed: C.SELECTED, onTop: true }),
      selectedPoints: pathMaterial({ palette, origins, fixed: C.SELECTED, onTop: true, pointSize: 5 }),
      changed: pathMaterial({ palette, origins, fixed: C.CHANGED, onTop: true }),
      other: pathMaterial({ palette, origins: otherOrigins, fixed: C.OTHER_REVISION, opacity: 0.35 }),
      otherChanged: pathMaterial({ palette, origins: otherOrigins, fixed: C.OTHER_REVISION, dotted: true, onTop: true }),
    };
  }, []);
  useEffect(() => () => Object.values(mats).forEach((m) => m.dispose()), [mats]);

  // ---- the path: one position and one attribute buffer, an index per style and detail ----
  const base = useMemo(() => {
    const position = new THREE.BufferAttribute(p.buffers.positions, 3);
    const seg = new THREE.BufferAttribute(p.buffers.vattr, 4, true);
    return { position, seg };
  }, [p.buffers]);
  const geoms = useMemo(() => {
    const make = (index: Uint32Array) => {
      const g = new THREE.BufferGeometry();
      g.setAttribute("position", base.position);
      g.setAttribute("seg", base.seg);
      g.setIndex(new THREE.BufferAttribute(index, 1));
      return g;
    };
    const ix = p.indices;
    const same = ix.cutCoarse === ix.cut;
    return {
      cut: make(ix.cut),
      rapid: make(ix.rapid),
      cutCoarse: same ? null : make(ix.cutCoarse),
      rapidCoarse: same ? null : make(ix.rapidCoarse),
    };
  }, [base, p.indices]);
  useEffect(() => () => Object.values(geoms).forEach((g) => g?.dispose()), [geoms]);

  const highlightGeom = useMemo(() => {
    if (!p.highlight || p.highlight.length === 0) return null;
    const g = new THREE.BufferGeometry();
    g.setAttribute("position", base.position);
    g.setAttribute("seg", base.seg);
    g.setIndex(new THREE.BufferAttribute(p.highlight, 1));
    return g;
  }, [base, p.highlight]);
  useEffect(() => () => highlightGeom?.dispose(), [highlightGeom]);

  const overlayGeoms = useMemo(() => {
    if (!p.overlay) return null;
    const o = p.overlay;
    const pos = new THREE.BufferAttribute(o.other.positions, 3);
    const seg = new THREE.BufferAttribute(o.other.vattr, 4, true);
    const make = (index: Uint32Array, position: THREE.BufferAttribute, attr: THREE.BufferAttribute) => {
      const g = new THREE.BufferGeometry();
      g.setAttribute("position", position);
      g.setAttribute("seg", attr);
      g.setIndex(new THREE.BufferAttribute(index, 1));
      return g;
    };
    return {
      other: make(o.otherPairs, pos, seg),
      otherChanged: make(o.otherChanged, pos, seg),
      changed: make(o.changed, base.position, base.seg),
    };
  }, [p.overlay, base]);
  useEffect(() => () => Object.values(overlayGeoms ?? {}).forEach((g) => g.dispose()), [overlayGeoms]);

  // ---- uniforms follow the settings ----
  useEffect(() => {
    for (const m of Object.values(mats)) {
      if (!(m instanceof THREE.ShaderMaterial)) continue;
      setColorMode(m, p.colorMode);
      setMachineSpace(m, p.machineSpace);
    }
    setOrigins(mats.origins, p.origins);
    if (p.overlay) setOrigins(mats.otherOrigins, p.overlay.otherOrigins);
    invalidate();
  }, [mats, p.colorMode, p.machineSpace, p.origins, p.overlay, invalidate]);

  // ---- camera: presets and fit to what is shown ----
  const fitTo = useRef<(dir?: THREE.Vector3) => void>(() => {});
  fitTo.current = (dir?: THREE.Vector3) => {
    const cam = camera as THREE.OrthographicCamera;
    const box = shownBox(props.current);
    const c = box.getCenter(new THREE.Vector3());
    const diag = Math.max(1, box.getSize(new THREE.Vector3()).length());
    const d = (dir ?? cam.position.clone().sub(controls.current?.target ?? new THREE.Vector3())).clone().normalize();
    const dist = Math.max(1000, diag * 4);
    cam.position.copy(c).addScaledVector(d, dist);
    cam.lookAt(c);
    cam.updateMatrixWorld();
    // the box's extent across the screen, from its corners on the camera's right and up axes
    const right = new THREE.Vector3().setFromMatrixColumn(cam.matrixWorld, 0);
    const up = new THREE.Vector3().setFromMatrixColumn(cam.matrixWorld, 1);
    let w = 0, h = 0;
    for (let k = 0; k < 8; k++) {
      const q = new THREE.Vector3(k & 1 ? box.max.x : box.min.x, k & 2 ? box.max.y : box.min.y, k & 4 ? box.max.z : box.min.z).sub(c);
      w = Math.max(w, Math.abs(q.dot(right)) * 2);
      h = Math.max(h, Math.abs(q.dot(up)) * 2);
    }
    cam.zoom = 0.86 * Math.min(size.width / Math.max(w, 1e-3), size.height / Math.max(h, 1e-3));
    cam.near = 0.1;
    cam.far = dist * 2 + diag * 2;
    cam.updateProjectionMatrix();
    if (controls.current) {
      controls.current.target.copy(c);
      controls.current.update();
    }
    invalidate();
  };
  useEffect(() => {
    const presets: Record<ViewPreset, THREE.Vector3> = {
      // straight down, nudged towards -Y so that +Y is up on the screen
      top: new THREE.Vector3(0, -1e-4, 1),
      front: new THREE.Vector3(0, -1, 0),
      side: new THREE.Vector3(1, 0, 0),
      iso: new THREE.Vector3(1, -1, 0.9),
    };
    p.controller.setView = (preset) => fitTo.current(presets[preset]);
    p.controller.fit = () => fitTo.current();
    p.controller.invalidate = invalidate;
  }, [p.controller, invalidate]);
  // a new path or a new space: start from the iso view, fitted
  const fitKey = `${p.buffers.positions.length}|${p.machineSpace}`;
  const firstFit = useRef("");
  useEffect(() => {
    if (firstFit.current === fitKey || size.width === 0 || p.buffers === EMPTY_BUFFERS) return;
    const first = firstFit.current === "";
    firstFit.current = fitKey;
    fitTo.current(first ? new THREE.Vector3(1, -1, 0.9) : undefined);
  }, [fitKey, size.width]);

  // ---- picking: vertex numbers rendered into a few pixels around the pointer ----
  const pick = useMemo(() => {
    const R = 6;
    const S = R * 2 + 1;
    const target = new THREE.WebGLRenderTarget(S, S, { depthBuffer: true });
    const buf = new Uint8Array(S * S * 4);
    const pickScene = new THREE.Scene();
    return { R, S, target, buf, pickScene };
  }, []);
  useEffect(() => () => pick.target.dispose(), [pick]);
  useEffect(() => {
    const el = gl.domElement;
    let down: { x: number; y: number; t: number } | null = null;
    const onDown = (e: PointerEvent) => {
      down = { x: e.clientX, y: e.clientY, t: performance.now() };
    };
    const onUp = (e: PointerEvent) => {
      if (!down || Math.hypot(e.clientX - down.x, e.clientY - down.y) > 5 || performance.now() - down.t > 600) return;
      down = null;
      const rect = el.getBoundingClientRect();
      const x = e.clientX - rect.left, y = e.clientY - rect.top;
      props.current.onPick(pickAt(x, y, e.pointerType === "touch" ? 14 : 6));
    };
    const pickAt = (x: number, y: number, radius: number): { segment: number; point: Xyz } | null => {
      const cam = camera as THREE.OrthographicCamera;
      const { R, S, target, buf, pickScene } = pick;
      const objs = [geoms.cut, geoms.rapid].map((g) => {
        const o = new THREE.LineSegments(g, mats.pick);
        o.frustumCulled = false;
        return o;
      });
      pickScene.add(...objs);
      cam.setViewOffset(size.width, size.height, x - R, y - R, S, S);
      const prevTarget = gl.getRenderTarget();
      gl.setRenderTarget(target);
      gl.setClearColor(0x000000, 0);
      gl.clear();
      gl.render(pickScene, cam);
      gl.readRenderTargetPixels(target, 0, 0, S, S, buf);
      gl.setRenderTarget(prevTarget);
      gl.setClearColor(C.BACKGROUND, 1);
      cam.clearViewOffset();
      pickScene.remove(...objs);
      let best = -1, bestD = Infinity;
      for (let py = 0; py < S; py++) {
        for (let px = 0; px < S; px++) {
          const o = (py * S + px) * 4;
          const id = buf[o]! | (buf[o + 1]! << 8) | (buf[o + 2]! << 16);
          if (id === 0) continue;
          const d = Math.hypot(px - R, py - R);
          if (d <= Math.min(R, radius) && d < bestD) {
            bestD = d;
            best = id - 1;
          }
        }
      }
      invalidate();
      if (best < 1) return null;
      const segment = best - 1;
      return { segment, point: pointOnSegment(props.current, segment, x, y, cam, size) };
    };
    el.addEventListener("pointerdown", onDown);
    el.addEventListener("pointerup", onUp);
    return () => {
      el.removeEventListener("pointerdown", onDown);
      el.removeEventListener("pointerup", onUp);
    };
  }, [gl, camera, size, geoms, mats, pick, invalidate]);

  // ---- one frame: coarse while the view moves, the full path when it rests ----
  useFrame(() => {
    const q = props.current;
    const coarse = interacting.current && geoms.cutCoarse !== null;
    const play = q.controller.play;
    const objects = scene.userData.path as { full: THREE.LineSegments[]; coarse: THREE.LineSegments[] } | undefined;
    let drawn = 0;
    if (objects) {
      objects.full.forEach((o) => (o.visible = !coarse));
      objects.coarse.forEach((o) => (o.visible = coarse));
      for (const o of coarse ? objects.coarse : objects.full) {
        const index = (o.geometry as THREE.BufferGeometry).index!;
        const pairs = index.count / 2;
        const shown = play.active ? pairsDone(index.array as Uint32Array, pairs, play.segment) : pairs;
        o.geometry.setDrawRange(0, shown * 2);
        drawn += shown;
      }
    }
    const tool = toolRef.current;
    if (tool) {
      tool.visible = play.active;
      if (play.active) {
        const o = q.machineSpace ? q.origins[play.offset] : null;
        tool.position.set(play.x + (o?.x ?? 0), play.y + (o?.y ?? 0), play.z + (o?.z ?? 0));
        tool.scale.setScalar(toolScale(camera as THREE.OrthographicCamera));
      }
    }
    const t0 = performance.now();
    gl.render(scene, camera);
    const issued = performance.now();
    const real = q.buffers !== EMPTY_BUFFERS;
    if ((real && framesSignalled.current < 3) || q.controller.timing) {
      // the first frames, and frames the bench is timing: wait for the GPU (a one-pixel read) to know it is drawn
      const ctx = gl.getContext();
      ctx.readPixels(0, 0, 1, 1, ctx.RGBA, ctx.UNSIGNED_BYTE, pixel);
      const at = performance.now();
      if (q.controller.timing) q.controller.frames.push({ ms: at - t0, cpuMs: issued - t0, coarse, segments: drawn });
      if (real && framesSignalled.current < 3) {
        framesSignalled.current++;
        q.onFrame({ at, coarse, segments: drawn });
      }
    }
    placeMarkers(q, camera as THREE.OrthographicCamera, size);
  }, 1);

  // the first frames come coarse (quick); the full path follows once the view is still
  useEffect(() => {
    interacting.current = geoms.cutCoarse !== null;
    framesSignalled.current = 0;
    invalidate();
    const t = setTimeout(() => {
      interacting.current = false;
      invalidate();
    }, 50);
    return () => clearTimeout(t);
  }, [geoms, invalidate]);

  const onChange = () => {
    interacting.current = true;
    if (stillTimer.current) clearTimeout(stillTimer.current);
    stillTimer.current = setTimeout(() => {
      interacting.current = false;
      invalidate();
    }, STILL_AFTER_MS);
  };

  const grid = useMemo(() => gridLines(p), [p.boxes, p.offsetShown, p.origins, p.machineSpace, p.buffers]);
  useEffect(() => p.onGrid(grid.spacing), [grid.spacing]);

  return (
    <>
      <OrbitControls ref={controls} makeDefault enableDamping={false} onChange={onChange} zoomToCursor screenSpacePanning />
      <PathObjects geoms={geoms} cut={mats.cut} rapid={mats.rapid} />
      {highlightGeom && (
        <>
          <lineSegments geometry={highlightGeom} material={mats.selected} frustumCulled={false} renderOrder={5} />
          <points geometry={highlightGeom} material={mats.selectedPoints} frustumCulled={false} renderOrder={5} />
        </>
      )}
      {overlayGeoms && (
        <>
          <lineSegments geometry={overlayGeoms.other} material={mats.other} frustumCulled={false} renderOrder={2} />
          <lineSegments geometry={overlayGeoms.otherChanged} material={mats.otherChanged} frustumCulled={false} renderOrder={3} />
          <lineSegments geometry={overlayGeoms.changed} material={mats.changed} frustumCulled={false} renderOrder={4} />
        </>
      )}
      <lineSegments geometry={grid.geometry} frustumCulled={false} renderOrder={-1}>
        <lineBasicMaterial vertexColors depthWrite={false} />
      </lineSegments>
      <SafeZPlanes {...p} />
      <OffsetTriads {...p} camera={camera as THREE.OrthographicCamera} />
      {p.machineSpace && p.travel && <TravelBox travel={p.travel} />}
      <MeasureLine points={p.measurePoints} />
      <group ref={toolRef} visible={false}>
        <mesh position={[0, 0, 6]} rotation={[-Math.PI / 2, 0, 0]} renderOrder={6}>
          <coneGeometry args={[2.2, 12, 16]} />
          <meshBasicMaterial color={C.TOOL_MARKER} depthTest={false} transparent />
        </mesh>
      </group>
    </>
  );
}

/** The path's line objects, registered for the frame loop. */
function PathObjects({ geoms, cut, rapid }: { geoms: Record<string, THREE.BufferGeometry | null>; cut: THREE.Material; rapid: THREE.Material }) {
  const { scene } = useThree();
  const objs = useMemo(() => {
    const mk = (pairs: [THREE.BufferGeometry | null, THREE.Material][]): THREE.LineSegments[] =>
      pairs.flatMap(([g, m]) => {
        if (!g) return [];
        const o = new THREE.LineSegments(g, m);
        o.frustumCulled = false;
        return [o];
      });
    return {
      full: mk([[geoms.cut ?? null, cut], [geoms.rapid ?? null, rapid]]),
      coarse: mk([[geoms.cutCoarse ?? null, cut], [geoms.rapidCoarse ?? null, rapid]]),
    };
  }, [geoms, cut, rapid]);
  useEffect(() => {
    const all = [...objs.full, ...objs.coarse];
    scene.add(...all);
    scene.userData.path = objs;
    return () => {
      scene.remove(...all);
      if (scene.userData.path === objs) delete scene.userData.path;
    };
  }, [objs, scene]);
  return null;
}

/** The box of what is shown, in the space shown (at least a small cube round the origin when nothing is). */
function shownBox(p: SceneProps): THREE.Box3 {
  const b = new THREE.Box3();
  p.boxes.forEach((box, i) => {
    if (box.empty || !p.offsetShown[i]) return;
    const o = p.machineSpace ? p.origins[i] : { x: 0, y: 0, z: 0 };
    if (!o) return;
    b.expandByPoint(new THREE.Vector3(box.min.x + o.x, box.min.y + o.y, box.min.z + o.z));
    b.expandByPoint(new THREE.Vector3(box.max.x + o.x, box.max.y + o.y, box.max.z + o.z));
  });
  if (b.isEmpty()) b.setFromCenterAndSize(new THREE.Vector3(), new THREE.Vector3(10, 10, 10));
  return b;
}

/** A 1-2-5 step for about ten squares across the shown box, and its lines on the floor below the path. */
function gridLines(p: SceneProps): { geometry: THREE.BufferGeometry; spacing: number } {
  const box = shownBox(p);
  const size = box.getSize(new THREE.Vector3());
  const span = Math.max(size.x, size.y, 1e-3);
  const raw = span / 10;
  const pow = 10 ** Math.floor(Math.log10(raw));
  const spacing = [1, 2, 5, 10].map((m) => m * pow).find((s) => s >= raw) ?? 10 * pow;
  const x0 = Math.floor(box.min.x / spacing - 1) * spacing, x1 = Math.ceil(box.max.x / spacing + 1) * spacing;
  const y0 = Math.floor(box.min.y / spacing - 1) * spacing, y1 = Math.ceil(box.max.y / spacing + 1) * spacing;
  const z = box.min.z - spacing * 0.25;
  const pos: number[] = [];
  const col: number[] = [];
  const g = new THREE.Color(C.GRID), a = new THREE.Color(C.GRID_AXIS);
  const push = (xa: number, ya: number, xb: number, yb: number, axis: boolean) => {
    pos.push(xa, ya, z, xb, yb, z);
    const c = axis ? a : g;
    col.push(c.r, c.g, c.b, c.r, c.g, c.b);
  };
  for (let x = x0; x <= x1 + 1e-9; x += spacing) push(x, y0, x, y1, Math.abs(x) < spacing * 1e-6);
  for (let y = y0; y <= y1 + 1e-9; y += spacing) push(x0, y, x1, y, Math.abs(y) < spacing * 1e-6);
  const geometry = new THREE.BufferGeometry();
  geometry.setAttribute("position", new THREE.Float32BufferAttribute(pos, 3));
  geometry.setAttribute("color", new THREE.Float32BufferAttribute(col, 3));
  return { geometry, spacing };
}

/** One translucent plane per shown part at its safe Z, a little wider than the part. */
function SafeZPlanes(p: SceneProps) {
  const planes = useMemo(() => {
    const out: { x: number; y: number; z: number; w: number; h: number; key: number }[] = [];
    p.boxes.forEach((b, i) => {
      if (b.empty || !p.offsetShown[i]) return;
      const o = p.machineSpace ? p.origins[i] : { x: 0, y: 0, z: 0 };
      if (!o) return;
      const m = Math.max(b.max.x - b.min.x, b.max.y - b.min.y) * 0.08 + 1;
      out.push({ x: (b.min.x + b.max.x) / 2 + o.x, y: (b.min.y + b.max.y) / 2 + o.y, z: p.safeZ + o.z, w: b.max.x - b.min.x + 2 * m, h: b.max.y - b.min.y + 2 * m, key: i });
    });
    // part space: one plane for all, as the parts lie on one another
    if (!p.machineSpace && out.length > 1) {
      const x0 = Math.min(...out.map((q) => q.x - q.w / 2)), x1 = Math.max(...out.map((q) => q.x + q.w / 2));
      const y0 = Math.min(...out.map((q) => q.y - q.h / 2)), y1 = Math.max(...out.map((q) => q.y + q.h / 2));
      return [{ x: (x0 + x1) / 2, y: (y0 + y1) / 2, z: p.safeZ, w: x1 - x0, h: y1 - y0, key: 0 }];
    }
    return out;
  }, [p.boxes, p.offsetShown, p.origins, p.machineSpace, p.safeZ]);
  // drawn before the path (renderOrder, all in the transparent pass), under it: a level to read, not a filter
  return (
    <>
      {planes.map((q) => (
        <group key={q.key} position={[q.x, q.y, q.z]}>
          <mesh renderOrder={-2}>
            <planeGeometry args={[q.w, q.h]} />
            <meshBasicMaterial color={C.SAFE_Z} transparent opacity={0.1} depthWrite={false} depthTest={false} side={THREE.DoubleSide} />
          </mesh>
          <lineLoop renderOrder={-2}>
            <bufferGeometry>
              <bufferAttribute
                attach="attributes-position"
                args={[new Float32Array([-q.w / 2, -q.h / 2, 0, q.w / 2, -q.h / 2, 0, q.w / 2, q.h / 2, 0, -q.w / 2, q.h / 2, 0]), 3]}
              />
            </bufferGeometry>
            <lineBasicMaterial color={C.SAFE_Z} transparent opacity={0.5} depthWrite={false} />
          </lineLoop>
        </group>
      ))}
    </>
  );
}

/** A small axis triad at each placed offset's zero (machine space), or at part zero. Its size follows the zoom. */
function OffsetTriads(p: SceneProps & { camera: THREE.OrthographicCamera }) {
  const group = useRef<THREE.Group>(null);
  const points = useMemo(() => {
    if (!p.machineSpace) return [{ x: 0, y: 0, z: 0, key: "part" }];
    return p.origins.flatMap((o, i) => (o && p.offsetShown[i] ? [{ ...o, key: String(i) }] : []));
  }, [p.machineSpace, p.origins, p.offsetShown]);
  const geometry = useMemo(() => {
    const g = new THREE.BufferGeometry();
    g.setAttribute("position", new THREE.Float32BufferAttribute([0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 1], 3));
    const [x, y, z] = [C.AXIS_X, C.AXIS_Y, C.AXIS_Z].map((h) => new THREE.Color(h));
    g.setAttribute("color", new THREE.Float32BufferAttribute([x!, x!, y!, y!, z!, z!].flatMap((c) => [c.r, c.g, c.b]), 3));
    return g;
  }, []);
  useFrame(() => {
    const s = 40 / p.camera.zoom;
    group.current?.children.forEach((c) => c.scale.setScalar(s));
  });
  return (
    <group ref={group}>
      {points.map((q) => (
        <lineSegments key={q.key} geometry={geometry} position={[q.x, q.y, q.z]} renderOrder={3}>
          <lineBasicMaterial vertexColors depthTest={false} transparent />
        </lineSegments>
      ))}
    </group>
  );
}

function TravelBox({ travel }: { travel: { min: Xyz; max: Xyz } }) {
  const geometry = useMemo(() => {
    const s = new THREE.Vector3(travel.max.x - travel.min.x, travel.max.y - travel.min.y, travel.max.z - travel.min.z);
    const box = new THREE.BoxGeometry(s.x, s.y, s.z);
    const edges = new THREE.EdgesGeometry(box);
    box.dispose();
    return edges;
  }, [travel]);
  const c = [(travel.min.x + travel.max.x) / 2, (travel.min.y + travel.max.y) / 2, (travel.min.z + travel.max.z) / 2] as const;
  return (
    <lineSegments geometry={geometry} position={c}>
      <lineBasicMaterial color={C.TRAVEL} transparent opacity={0.7} />
    </lineSegments>
  );
}

function MeasureLine({ points }: { points: Xyz[] }) {
  const geometry = useMemo(() => {
    const g = new THREE.BufferGeometry();
    g.setAttribute("position", new THREE.Float32BufferAttribute(points.flatMap((q) => [q.x, q.y, q.z]), 3));
    return g;
  }, [points]);
  if (points.length === 0) return null;
  return (
    <>
      <points geometry={geometry} renderOrder={7}>
        <pointsMaterial color={C.MEASURE} size={7} sizeAttenuation={false} depthTest={false} transparent />
      </points>
      {points.length === 2 && (
        <lineSegments geometry={geometry} renderOrder={7}>
          <lineBasicMaterial color={C.MEASURE} depthTest={false} transparent />
        </lineSegments>
      )}
    </>
  );
}

/** The tool marker's scale: about 40 px tall whatever the zoom. */
const toolScale = (cam: THREE.OrthographicCamera) => 40 / 12 / cam.zoom;

const projected = new THREE.Vector3();
const pixel = new Uint8Array(4);

/** Places the DOM markers over the canvas where their points are after this frame's camera. */
function placeMarkers(p: SceneProps, cam: THREE.OrthographicCamera, size: { width: number; height: number }): void {
  const layer = p.markerLayer.current;
  if (!layer) return;
  const els = layer.children;
  for (let i = 0; i < els.length; i++) {
    const el = els[i] as HTMLElement;
    const m = p.markers[Number(el.dataset.marker)];
    if (!m) continue;
    const o = p.machineSpace ? p.origins[m.offset] : { x: 0, y: 0, z: 0 };
    if (!o || !p.offsetShown[m.offset]) {
      el.style.display = "none";
      continue;
    }
    projected.set(m.x + o.x, m.y + o.y, m.z + o.z).project(cam);
    const x = (projected.x * 0.5 + 0.5) * size.width;
    const y = (-projected.y * 0.5 + 0.5) * size.height;
    const inside = x >= -8 && y >= -8 && x <= size.width + 8 && y <= size.height + 8;
    el.style.display = inside ? "" : "none";
    el.style.transform = `translate(${x.toFixed(1)}px, ${y.toFixed(1)}px)`;
  }
}

/** The point of segment `seg` nearest to the ray through the pixel (x, y): its nearer end when within 10 px. */
function pointOnSegment(p: SceneProps, seg: number, x: number, y: number, cam: THREE.OrthographicCamera, size: { width: number; height: number }): Xyz {
  const pos = p.buffers.positions;
  const off = p.buffers.vattr[(seg + 1) * 4 + 2]!;
  const o = p.machineSpace ? (p.origins[off] ?? { x: 0, y: 0, z: 0 }) : { x: 0, y: 0, z: 0 };
  const a = new THREE.Vector3(pos[seg * 3]! + o.x, pos[seg * 3 + 1]! + o.y, pos[seg * 3 + 2]! + o.z);
  const b = new THREE.Vector3(pos[seg * 3 + 3]! + o.x, pos[seg * 3 + 4]! + o.y, pos[seg * 3 + 5]! + o.z);
  const screen = (v: THREE.Vector3) => {
    const q = v.clone().project(cam);
    return new THREE.Vector2((q.x * 0.5 + 0.5) * size.width, (-q.y * 0.5 + 0.5) * size.height);
  };
  const click = new THREE.Vector2(x, y);
  const da = screen(a).distanceTo(click), db = screen(b).distanceTo(click);
  if (Math.min(da, db) <= 10) return da <= db ? { x: a.x, y: a.y, z: a.z } : { x: b.x, y: b.y, z: b.z };
  const ray = new THREE.Raycaster();
  ray.setFromCamera(new THREE.Vector2((x / size.width) * 2 - 1, -(y / size.height) * 2 + 1), cam);
  const onSeg = new THREE.Vector3();
  ray.ray.distanceSqToSegment(a, b, undefined, onSeg);
  return { x: onSeg.x, y: onSeg.y, z: onSeg.z };
}
