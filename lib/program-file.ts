/** Helpers for stored program files (pure: the server, scripts and the browser may use them). */

/** Counts lines the engine's way (CR, LF and CRLF each end one; a last line without an ending counts). */
export function countLines(bytes: Uint8Array): number {
  let n = 0;
  const len = bytes.length;
  for (let i = 0; i < len; i++) {
    const c = bytes[i]!;
    if (c === 10) n++;
    else if (c === 13) {
      n++;
      if (bytes[i + 1] === 10) i++;
    }
  }
  const last = bytes[len - 1];
  return last === undefined || last === 10 || last === 13 ? n : n + 1;
}

/**
 * A file name as a display label only: the last path segment (either slash), no control, format or bidi-override
 * characters, no leading dots, spaces collapsed, at most MAX_FILE_NAME characters (the extension kept). Never
 * used as a path. Empty results fall back to `fallback`.
 */
export const MAX_FILE_NAME = 120;

export function cleanFileName(raw: string | null | undefined, fallback = "program.nc"): string {
  if (!raw) return fallback;
  let s = raw.normalize("NFC");
  s = s.split(/[\\/]/).pop() ?? "";
  // C0/C1 controls, DEL, bidi embeddings/overrides/isolates, zero-width and BOM, line/paragraph separators.
  s = s.replace(/[\u0000-\u001f\u007f-\u009f\u200b-\u200f\u2028-\u202e\u2060-\u2069\ufeff]/g, "");
  s = s.replace(/\s+/g, " ").trim().replace(/^[.\s]+/, "");
  if (s.length > MAX_FILE_NAME) {
    const dot = s.lastIndexOf(".");
    const ext = dot > 0 && s.length - dot <= 10 ? s.slice(dot) : "";
    s = s.slice(0, MAX_FILE_NAME - ext.length).trimEnd() + ext;
  }
  return s || fallback;
}

/** Content-Disposition for a download (RFC 6266 / RFC 8187): an ASCII fallback and the UTF-8 name. */
export function attachmentDisposition(name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, "_").replace(/["\\%]/g, "_");
  const encoded = encodeURIComponent(name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `attachment; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
