import type { AnalyzeOptions } from "@/lib/gcode/types";
import type { StyleIndices, Visibility } from "@/lib/viewer/render-buffers";
import type { Xyz } from "@/lib/viewer/placement";
import type { ViewerMeta } from "@/lib/viewer/types";

/**
 * Where the viewer takes a toolpath from: "route" is GET /api/revisions/{id}/toolpath (the default, kept after
 * measuring both; DEVELOPERS.md "The 3D backplot"), "bytes" runs the engine here on the revision's file (the
 * fallback when the route cannot answer, and the other side of `npm run bench:viewer`).
 */
export type PathSource = "route" | "bytes";

/** One revision to load: its id and, for the "bytes" way, the options its analysis runs with. */
export interface PathRequest {
  revisionId: number;
  options: AnalyzeOptions;
  source: PathSource;
  /** "bytes": the file as the page already has it (the code pane's download); fetched when absent. */
  bytes?: Uint8Array;
}

export type ToWorker =
  | { type: "load"; request: PathRequest; visibility: Visibility; coarseTarget: number }
  | { type: "indices"; seq: number; visibility: Visibility }
  | { type: "overlay"; request: PathRequest };

/** The page's share of a loaded path: what the GPU draws and what playback and linking read. */
export interface PathBuffers {
  meta: ViewerMeta;
  /** xyz per vertex. */
  positions: Float32Array;
  /** Per vertex: kind, tool byte, offset of the segment ending there (render-buffers.ts). */
  vattr: Uint8Array;
  line: Uint32Array;
  /** End of each segment's motion, seconds. */
  time: Float32Array;
  /** Segments whose motion does not start where the one before ended (pauses). */
  pauses: { at: Uint32Array; start: Float32Array };
  /** Per work offset index: the box of its drawn segments, part coordinates (min above max when empty). */
  boxes: { min: Xyz; max: Xyz }[];
}

export interface LoadReport {
  source: PathSource;
  /** Bytes received (compressed, as on the wire) and how long fetching and making the path took, ms. */
  wireBytes: number;
  fetchMs: number;
  /** Of the fetch: until the server started to answer. */
  waitMs: number;
  buildMs: number;
  buffersMs: number;
  /** The route fell back to the bytes: why. */
  fallback: string | null;
}

/** Another revision to overlay, with what changed between the two. */
export interface OverlayResult {
  revisionId: number;
  other: PathBuffers;
  /** Pairs of every drawable segment of the other revision, and of its changed ones. */
  otherPairs: Uint32Array;
  otherChanged: Uint32Array;
  /** Pairs of this revision's changed segments. */
  changed: Uint32Array;
  changedCount: number;
  otherChangedCount: number;
}

export type FromWorker =
  | { type: "ready"; buffers: PathBuffers; indices: StyleIndices; report: LoadReport }
  | { type: "indices"; seq: number; indices: StyleIndices }
  | ({ type: "overlay" } & OverlayResult)
  | { type: "error"; stage: "load" | "overlay"; message: string };
