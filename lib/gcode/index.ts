/** Cyclegate analysis engine: pure TypeScript, no framework, database, DOM or Node imports. */
export * from "./types";
export { analyzeProgram, trapezoidSeconds } from "./analyze";
export { checkTextProgram, assertTextProgram, MAX_PROGRAM_BYTES } from "./text";
export {
  segmentEndpoints,
  toolpathSegments,
  toolpathLinePairs,
  serializeToolpath,
  deserializeToolpath,
  serializeAnalysis,
  deserializeAnalysis,
  bytesToBase64,
  base64ToBytes,
  type SegmentView,
} from "./toolpath";
export { arcFromCenter, arcFromRadius, arcExtremes, arcLength, chordCount } from "./arc";
export { HINTS } from "./rules";
export { ENGINE_VERSION } from "./version";
