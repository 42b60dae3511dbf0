/**
 * Lines of a program's bytes, found only as far as someone asks: the code pane shows a window of a file that may
 * hold a million lines, so it indexes line starts lazily (one forward scan, never repeated) and decodes only the
 * lines on screen. Lines end the engine's way: CR, LF and CRLF each end one line.
 */
export class LineIndex {
  private readonly starts: Uint32Array;
  /** Lines whose start is known: starts[0..known). */
  private known = 1;
  /** Where the scan stopped. */
  private pos = 0;
  private readonly decoder = new TextDecoder("utf-8");

  constructor(
    readonly bytes: Uint8Array,
    /** Physical lines in the file (as the server counted them). */
    readonly lineCount: number,
  ) {
    this.starts = new Uint32Array(lineCount + 1);
    this.starts[0] = 0;
  }

  /** Scans forward until the start of line `n` (0-based) and the one after it are known. */
  private ensure(n: number) {
    const target = Math.min(n + 1, this.lineCount);
    const b = this.bytes;
    const len = b.length;
    let i = this.pos;
    while (this.known <= target && i < len) {
      const c = b[i]!;
      if (c === 10 || c === 13) {
        if (c === 13 && b[i + 1] === 10) i++;
        this.starts[this.known++] = i + 1;
      }
      i++;
    }
    this.pos = i;
    // The end of the file closes the last line.
    while (this.known <= target) this.starts[this.known++] = len;
  }

  /** Line `n` (0-based) without its line ending; at most `maxChars` characters ("…" marks a cut). */
  line(n: number, maxChars = 2000): string {
    if (n < 0 || n >= this.lineCount) return "";
    this.ensure(n);
    const start = this.starts[n]!;
    let end = this.starts[n + 1]!;
    // Drop the line ending (LF, CR or CRLF) of every line but a last one without one.
    if (end > start && (this.bytes[end - 1] === 10 || this.bytes[end - 1] === 13)) end--;
    if (end > start && this.bytes[end - 1] === 13) end--;
    const cut = end - start > maxChars * 4;
    const text = this.decoder.decode(this.bytes.subarray(start, cut ? start + maxChars * 4 : end));
    return text.length > maxChars || cut ? `${text.slice(0, maxChars)}…` : text;
  }

  /** How many line starts are known so far (for tests: the index stays lazy). */
  get indexedLines(): number {
    return this.known - 1;
  }
}
