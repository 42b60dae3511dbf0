/**
 * What the viewer's panels and its 3D scene share without re-rendering React: the scene registers its camera
 * actions here, and the panels write the playback state the scene reads every frame.
 */
export type ViewPreset = "top" | "front" | "side" | "iso";

export interface PlayMarker {
  /** Show the tool and reveal the path up to `segment`. */
  active: boolean;
  /** Segments before this one are drawn in full (drawRange). */
  segment: number;
  /** Tool tip, part coordinates, and its work offset (for machine space). */
  x: number;
  y: number;
  z: number;
  offset: number;
}

export interface FrameInfo {
  /** performance.now() when the frame was handed to the GPU and read back (the first frames only). */
  at: number;
  coarse: boolean;
  /** Segments drawn. */
  segments: number;
}

export class ViewerController {
  play: PlayMarker = { active: false, segment: 0, x: 0, y: 0, z: 0, offset: 0 };
  /** Set by the scene. */
  setView: (preset: ViewPreset) => void = () => {};
  fit: () => void = () => {};
  invalidate: () => void = () => {};
  /**
   * Set by `npm run bench:viewer` (through window.__cyclegateBackplot, only where localStorage asks for it): every
   * frame then waits for the GPU and records how long it took, and how long the page's thread spent issuing it.
   */
  timing = false;
  frames: { ms: number; cpuMs: number; coarse: boolean; segments: number }[] = [];
}
