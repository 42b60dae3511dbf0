/**
 * Deterministic synthetic posted program for the benchmark: header tool list, two work offsets (G54, G55) cut by
 * tool, a contour tool with IJ and R arcs, a drill with G81/G83 cycles, and a long 3D surfacing section.
 */

/** A small deterministic generator (LCG), so every run benchmarks the same bytes. */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

const f3 = (x: number, digits = 3): string => {
  const s = x.toFixed(digits);
  return s.replace(/0+$/, "").replace(/\.$/, ".");
};

/** Builds the program text with exactly `lines` lines (default 1,000,000). */
export function benchProgram(lines = 1_000_000): string {
  const r = rng(12345);
  const out: string[] = [];
  const push = (s: string): void => {
    out.push(s);
  };
  push("%");
  push("O1234 (BENCH PART)");
  push("(T1 D=10. CR=0. - ZMIN=-3. - FLAT END MILL)");
  push("(T2 D=6.8 - ZMIN=-20. - DRILL)");
  push("(T3 D=6. CR=3. - ZMIN=-8. - BALL END MILL)");
  push("G90 G94 G17 G21 G40 G49 G80");
  const footer = ["M5", "M9", "G28 G91 Z0.", "G90", "M30", "%"];
  const budget = lines - out.length - footer.length;
  // per offset and tool: contour 6%, drilling 4%, surfacing the rest
  const perOffset = Math.floor(budget / 2);
  const contourLines = Math.floor(perOffset * 0.06);
  const drillLines = Math.floor(perOffset * 0.04);
  const offsets = ["G54", "G55"];
  const sections: { tool: number; kind: "contour" | "drill" | "surface"; lines: number }[] = [
    { tool: 1, kind: "contour", lines: contourLines },
    { tool: 2, kind: "drill", lines: drillLines },
    { tool: 3, kind: "surface", lines: perOffset - contourLines - drillLines },
  ];
  for (const sec of sections) {
    const speed = sec.tool === 1 ? 9000 : sec.tool === 2 ? 2500 : 12000;
    for (const off of offsets) {
      const start = out.length;
      const target = start + sec.lines;
      if (off === "G54") {
        push("G28 G91 Z0.");
        push("G90");
        push(`T${sec.tool} M6`);
        push(`S${speed} M3`);
      }
      push(`${off} G0 X0. Y0.`);
      push(`G43 Z25. H${sec.tool}`);
      push("M8");
      const rr = rng(sec.tool * 7919);
      if (sec.kind === "contour") {
        push("G0 Z2.");
        push("G1 Z-2. F400.");
        let x = 0;
        let y = 0;
        let k = 0;
        while (out.length < target - 3) {
          const step = 4 + rr() * 20;
          if (k % 10 === 4) {
            // 90-degree corner arc, centre form
            const rad = 2 + rr() * 3;
            push(`G3 X${f3(x + rad)} Y${f3(y + rad)} I${f3(rad)} J0.`);
            x += rad;
            y += rad;
          } else if (k % 10 === 9) {
            const rad = 2 + rr() * 3;
            push(`G2 X${f3(x + rad)} Y${f3(y - rad)} R${f3(rad)}`);
            x += rad;
            y -= rad;
          } else if (k % 2 === 0) {
            x += k % 4 === 0 ? step : -step * 0.5;
            push(`G1 X${f3(x)}${k % 20 === 0 ? " F1200." : ""}`);
          } else {
            y += k % 3 === 0 ? step : -step * 0.5;
            push(`${k % 10 === 5 || k % 10 === 0 ? "G1 " : ""}Y${f3(y)}`);
          }
          if (Math.abs(x) > 150 || Math.abs(y) > 150) {
            push("G0 Z2.");
            push("X0. Y0.");
            push("G1 Z-2. F400.");
            x = 0;
            y = 0;
          }
          k++;
        }
        push("G0 Z25.");
      } else if (sec.kind === "drill") {
        push("G0 Z10.");
        let n = 0;
        while (out.length < target - 2) {
          const x = 5 + (n % 40) * 3.5;
          const y = 5 + Math.floor(n / 40) * 3.5;
          if (n % 200 === 0) push(`G98 G${n % 400 === 0 ? 81 : 83} X${f3(x)} Y${f3(y)} Z-12. R2.${n % 400 === 0 ? "" : " Q3."} F250.`);
          else push(`X${f3(x)} Y${f3(y)}`);
          n++;
        }
        push("G80");
        push("G0 Z25.");
      } else {
        push("G0 X0. Y0. Z2.");
        push("G1 Z-1. F1500.");
        let x = 0;
        let y = 0;
        let dir = 1;
        while (out.length < target - 1) {
          x += dir * (0.3 + rr() * 0.2);
          if (x > 120 || x < 0) {
            dir = -dir;
            y += 0.5;
            if (y > 120) y = 0;
          }
          const z = -1 - 3 * Math.sin(x / 20) * Math.cos(y / 25) - rr() * 0.01;
          push(`X${f3(x, 4)} Y${f3(y, 4)} Z${f3(z, 4)}`);
        }
        push("G0 Z25.");
      }
      while (out.length < target) push("(SECTION END)");
    }
  }
  for (const l of footer) push(l);
  while (out.length < lines) out.splice(out.length - 2, 0, "(PAD)");
  return out.join("\n") + "\n";
}
