import { describe, expect, it } from "vitest";
import { analyzeProgram } from "./gcode";
import { attachmentDisposition, cleanFileName, countLines } from "./program-file";

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
