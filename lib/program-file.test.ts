import { describe, expect, it } from "vitest";
import { analyzeProgram } from "./gcode";
import { attachmentDisposition, cleanFileName, countLines, programHeader } from "./program-file";

describe("countLines", () => {
  it("counts like the engine for every line ending", () => {
    for (const text of ["", "G0\n", "G0", "G0\r\nG1\r\n", "G0\rG1\rG2", "a\n\nb\r\n\r\n", "\n\n\n"]) {
      expect(countLines(new TextEncoder().encode(text))).toBe(analyzeProgram(text, { toolpath: false }).lineCount);
    }
  });
});

describe("cleanFileName", () => {
  it("keeps the last path segment, drops control and bidi characters and leading dots, limits the length", () => {
    expect(cleanFileName("/etc/passwd")).toBe("passwd");
    expect(cleanFileName("C:\\posts\\O1001.NC")).toBe("O1001.NC");
    expect(cleanFileName("a\u0000b\u0007c\u007f\u0085.nc")).toBe("abc.nc");
    expect(cleanFileName("\u202Egnp.nc")).toBe("gnp.nc");
    expect(cleanFileName("  many   spaces \t.nc ")).toBe("many spaces .nc");
    expect(cleanFileName("...")).toBe("program.nc");
    expect(cleanFileName(null, "O1001.nc")).toBe("O1001.nc");
    const long = cleanFileName(`${"x".repeat(200)}.tap`);
    expect(long).toHaveLength(120);
    expect(long.endsWith(".tap")).toBe(true);
    expect(cleanFileName("Ø 12 – Deckel.nc")).toBe("Ø 12 – Deckel.nc");
  });
});

describe("attachmentDisposition (RFC 6266 with the RFC 8187 UTF-8 form)", () => {
  it("gives an ASCII fallback and the exact name percent-encoded", () => {
    expect(attachmentDisposition("O1001.nc")).toBe(`attachment; filename="O1001.nc"; filename*=UTF-8''O1001.nc`);
    expect(attachmentDisposition('a "b" ü.nc')).toBe(`attachment; filename="a _b_ _.nc"; filename*=UTF-8''a%20%22b%22%20%C3%BC.nc`);
    expect(attachmentDisposition("it's (1).nc")).toBe(`attachment; filename="it's (1).nc"; filename*=UTF-8''it%27s%20%281%29.nc`);
  });
});

describe("programHeader", () => {
  const enc = (s: string) => new TextEncoder().encode(s);

  it("keeps the opening lines up to the first line of code, with their line numbers", () => {
    const h = programHeader(enc("%\r\nO2207 (SENSOR BRACKET)\r\n(VISE 1 = G54)\r\n\r\n; posted today\r\nN10 (FACE)\r\nN20 G90 G21\r\n(LATER)\r\n"));
    expect(h.lines).toEqual([
      { line: 1, text: "%" },
      { line: 2, text: "O2207 (SENSOR BRACKET)" },
      { line: 3, text: "(VISE 1 = G54)" },
      { line: 4, text: "" },
      { line: 5, text: "; posted today" },
      { line: 6, text: "N10 (FACE)" },
    ]);
    expect(h.truncated).toBe(false);
  });

  it("stops at code on the number line, drops a byte order mark and control characters", () => {
    expect(programHeader(enc("\ufeff(A)\u0007\nO1 G0 X0\n(B)\n")).lines).toEqual([{ line: 1, text: "(A)" }]);
    expect(programHeader(enc("G90\n(A)\n")).lines).toEqual([]);
  });

  it("says when more opening lines follow than it shows, or the head ended inside them", () => {
    const many = Array.from({ length: 30 }, (_, i) => `(LINE ${i})`).join("\n") + "\nG0 X0\n";
    const h = programHeader(enc(many), { maxLines: 5 });
    expect(h.lines).toHaveLength(5);
    expect(h.truncated).toBe(true);
    const cut = programHeader(enc("(ONE)\n(TWO)\n(THR"), { complete: false });
    expect(cut.lines.map((l) => l.text)).toEqual(["(ONE)", "(TWO)"]);
    expect(cut.truncated).toBe(true);
    const long = programHeader(enc(`(${"X".repeat(300)})\nG0\n`), { maxChars: 20 });
    expect(long.lines[0]!.text).toHaveLength(20);
  });
});
