/**
 * The backplot's colours: our own, chosen to read apart on the dark canvas and from each other. Motion kinds are
 * warm for cutting and cool (dotted) for rapids; tools and work offsets cycle through one list of distinct hues.
 */
import { MotionKind } from "@/lib/gcode/types";

export const BACKGROUND = "#1c2430";
export const GRID = "#313c4a";
export const GRID_AXIS = "#4a5869";

/** Per MotionKind value (index). */
export const KIND_COLORS: Record<number, string> = {
  [MotionKind.Rapid]: "#8fb7ff",
  [MotionKind.Feed]: "#f4b942",
  [MotionKind.Arc]: "#59d1a6",
  [MotionKind.CycleFeed]: "#c48cf5",
  [MotionKind.CycleRapid]: "#6fd7ee",
  [MotionKind.Machine]: "#b8c0cc",
  [MotionKind.Jump]: "#000000",
};

export const KIND_NAMES: Record<number, string> = {
  [MotionKind.Feed]: "Feed (G1)",
  [MotionKind.Arc]: "Arc (G2/G3)",
  [MotionKind.CycleFeed]: "Cycle feed",
  [MotionKind.Rapid]: "Rapid (G0)",
  [MotionKind.CycleRapid]: "Cycle rapid",
  [MotionKind.Machine]: "Machine move (G28/G53)",
};

/** Tools and work offsets by index, repeating. */
export const SERIES = ["#f4b942", "#59d1a6", "#ff7b8a", "#8fb7ff", "#c48cf5", "#e6e36b", "#6bd0e6", "#ff9f5a", "#9be36b", "#e67bd0", "#b0a3ff", "#d9d9d9"];

export const seriesColor = (i: number) => SERIES[i % SERIES.length]!;

/** The selected line's moves, the tool in playback, the measuring line, the overlay. */
export const SELECTED = "#ffffff";
export const TOOL_MARKER = "#ff3ec9";
export const MEASURE = "#3ef0ff";
export const CHANGED = "#ff5c7a";
export const OTHER_REVISION = "#a9b4c2";
export const SAFE_Z = "#5fa8ff";
export const TRAVEL = "#7b8796";
export const AXIS_X = "#e0533d";
export const AXIS_Y = "#3dbb61";
export const AXIS_Z = "#3d7fe0";

export function rgb(hex: string): [number, number, number] {
  const v = parseInt(hex.slice(1), 16);
  return [(v >> 16) & 255, (v >> 8) & 255, v & 255];
}
