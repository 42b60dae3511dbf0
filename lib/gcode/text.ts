import type { TextCheck } from "./types";

/** Most bytes accepted by checkTextProgram (64 MiB). */
export const MAX_PROGRAM_BYTES = 64 * 1024 * 1024;

/**
 * Whether `bytes` is a text program the engine should analyse: not empty, no NUL or other binary control bytes,
 * valid UTF-8, at most MAX_PROGRAM_BYTES. The CLI and the web upload both use this rule.
 * Allowed control bytes: TAB, LF, VT, FF, CR, DC1-DC4 (tape reader codes) and SUB (an old end-of-file mark).
 */
export function checkTextProgram(bytes: Uint8Array): TextCheck {
  const n = bytes.length;
  if (n === 0) return { ok: false, reason: "the file is empty" };
  if (n > MAX_PROGRAM_BYTES) return { ok: false, reason: `the file is larger than ${MAX_PROGRAM_BYTES} bytes` };
  for (let i = 0; i < n; i++) {
    const c = bytes[i]!;
    if (c >= 0x20) continue;
    if (c === 9 || c === 10 || c === 11 || c === 12 || c === 13 || (c >= 0x11 && c <= 0x14) || c === 0x1a) continue;
    if (c === 0) return { ok: false, reason: `the file contains NUL bytes (first at byte ${i}): it is binary, not a text program` };
    return { ok: false, reason: `the file contains binary control byte 0x${c.toString(16).padStart(2, "0")} at byte ${i}: not a text program` };
  }
  try {
    new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    return { ok: false, reason: "the file is not valid UTF-8 text" };
  }
  return { ok: true };
}

/** Throws an Error with the checkTextProgram reason when `bytes` is not a text program. */
export function assertTextProgram(bytes: Uint8Array): void {
  const r = checkTextProgram(bytes);
  if (!r.ok) throw new Error(r.reason);
}
