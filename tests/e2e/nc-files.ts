/** NC programs the browser tests upload: invented, clean on the demo machines unless they say otherwise. */

/** A clean program of about `lines` lines: one tool under G54, a zigzag of cuts 1 mm deep. `tag` makes it unique. */
export function zigzagProgram(tag: string, lines = 2000, extra: { at?: number; text?: string } = {}): string {
  const head = [
    "%",
    `O4321 (BROWSER TEST ${tag})`,
    "G90 G94 G17 G40 G49 G80 G21",
    "T1 M6 (D10 END MILL)",
    "G54 G0 X0 Y0 S3000 M3",
    "G43 H1 Z25",
    "G0 Z2",
    "G1 Z-1 F200",
  ];
  const body: string[] = [];
  const moves = Math.max(10, lines - head.length - 6);
  for (let i = 0; i < moves; i++) {
    if (extra.text && extra.at === head.length + body.length + 1) body.push(extra.text);
    const y = (i % 200) * 0.5;
    body.push(`G1 X${i % 2 === 0 ? 100 : 0} Y${y.toFixed(1)} F1500`);
  }
  return [...head, ...body, "G0 Z25", "M5", "G28 G91 Z0", "G90", "M30", "%", ""].join("\n");
}
