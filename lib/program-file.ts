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

/** A comment-only line: "(…)", "; …", a block number with only a comment, or blank. */
const COMMENT_LINE = /^(?:N\d+\s*)?(?:\(.*\)\s*|;.*)?$/i;
/** The program number line, with nothing after the number but a comment: "O1001", ":1001 (BRACKET)". */
const NUMBER_LINE = /^[O:]\s*\d+\s*(?:\(.*\)\s*|;.*)?$/i;
const DISPLAY_CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u200b-\u200f\u2028-\u202e\u2060-\u2069\ufeff]/g;

export interface ProgramHeader {
  /** The program's opening lines with their physical line numbers: "%", the number line, comment lines. */
  lines: { line: number; text: string }[];
  /** More opening lines follow than are shown (or the head read ended inside them). */
  truncated: boolean;
}

/**
 * The opening lines of a program as a control shows them when it opens the file: everything before the first line
 * that holds code but the "%" marker, the program number line and comment lines. `head` is the start of the file
 * (it may end mid-line: `complete` false); at most `maxLines` lines of at most `maxChars` characters each.
 */
export function programHeader(head: Uint8Array, { complete = true, maxLines = 16, maxChars = 160 } = {}): ProgramHeader {
  let text = new TextDecoder("utf-8").decode(head);
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const raw = text.split(/\r\n|\r|\n/);
  // The last piece of a head cut short is a partial line.
  const cut = !complete && raw.length > 0;
  if (cut) raw.pop();
  const lines: ProgramHeader["lines"] = [];
  let truncated = cut;
  for (let i = 0; i < raw.length; i++) {
    const shown = raw[i]!.replace(DISPLAY_CONTROL, "").trimEnd();
    const t = shown.trim();
    if (!(t === "%" || COMMENT_LINE.test(t) || NUMBER_LINE.test(t))) {
      truncated = false;
      break;
    }
    if (lines.length === maxLines) {
      truncated = true;
      break;
    }
    lines.push({ line: i + 1, text: shown.length > maxChars ? `${shown.slice(0, maxChars - 1)}…` : shown });
  }
  while (lines.length > 0 && lines[lines.length - 1]!.text.trim() === "") lines.pop();
  return { lines, truncated };
}
