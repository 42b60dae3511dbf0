// gcode-parser ships no types; only what Cyclegate uses is declared.
declare module "gcode-parser" {
  interface ParsedLine {
    line: string;
    words: [string, number | string][];
    ln?: number;
    cmds?: string[];
    err?: boolean;
  }
  export function parseLine(line: string, options?: { flatten?: boolean; noParseLine?: boolean; lineMode?: string }): ParsedLine;
  const parser: { parseLine: typeof parseLine };
  export default parser;
}
