/**
 * CLI: npm run --silent analyze -- FILE [--machine machine.json] [--dialect common|strict-ngc] [--arc-tolerance N]
 *   [--safe-z N] [--parts N] [--offsets offsets.json] [--chord-tolerance N] [--json]
 * Exit codes: 0 no error findings, 1 error findings, 2 bad input (not a text program, unreadable file, bad arguments).
 */
import { readFileSync } from "node:fs";
import { z } from "zod";
import { machineProfileSchema, workOffsetValuesSchema } from "../lib/machine-profile";
import {
  DIALECTS,
  analyzeProgram,
  checkTextProgram,
  serializeAnalysis,
  type Analysis,
  type AnalyzeOptions,
  type Bounds,
  type Dialect,
} from "../lib/gcode";

const USAGE =
  "usage: analyze FILE [--machine machine.json] [--dialect common|strict-ngc] [--arc-tolerance N] [--safe-z N] [--parts N] [--offsets offsets.json] [--chord-tolerance N] [--json]";

function fail(msg: string): never {
  process.stderr.write(`analyze: ${msg}\n`);
  process.exit(2);
}

function parseArgs(argv: string[]): { file: string; opts: AnalyzeOptions; json: boolean } {
  let file: string | undefined;
  const opts: AnalyzeOptions = {};
  let json = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    const value = (): string => {
      const v = argv[++i];
      if (v === undefined) fail(`${a} needs a value`);
      return v;
    };
    if (a === "--json") json = true;
    else if (a === "--machine") opts.machine = validated(machineProfileSchema, readJson(value(), "machine profile"), "machine profile");
    else if (a === "--offsets") opts.workOffsets = validated(workOffsetValuesSchema, readJson(value(), "work offsets"), "work offsets");
    else if (a === "--safe-z") {
      const v = Number(value());
      if (!Number.isFinite(v)) fail("--safe-z needs a number");
      opts.safeZ = v;
    } else if (a === "--parts") {
      const v = Number(value());
      if (!Number.isInteger(v) || v < 1) fail("--parts needs a positive integer");
      opts.parts = v;
    } else if (a === "--dialect") {
      const v = value();
      if (!(DIALECTS as readonly string[]).includes(v)) fail(`--dialect needs one of ${DIALECTS.join(", ")}`);
      opts.dialect = v as Dialect;
    } else if (a === "--arc-tolerance") {
      const v = Number(value());
      if (!(v > 0) || !Number.isFinite(v)) fail("--arc-tolerance needs a positive number");
      opts.arcTolerance = v;
    } else if (a === "--chord-tolerance") {
      const v = Number(value());
      if (!(v > 0)) fail("--chord-tolerance needs a positive number");
      opts.chordTolerance = v;
    } else if (a === "--help" || a === "-h") {
      process.stdout.write(`${USAGE}\n`);
      process.exit(0);
    } else if (a.startsWith("--")) fail(`unknown option ${a}`);
    else if (file === undefined) file = a;
    else fail(`unexpected argument ${a}`);
  }
  if (file === undefined) fail(`no file given (${USAGE})`);
  return { file, opts, json };
}

/** One line naming every bad field, so a hand-written profile is fixed in one go. */
function validated<T extends z.ZodType>(schema: T, data: unknown, what: string): z.infer<T> {
  const r = schema.safeParse(data);
  if (r.success) return r.data;
  const issues = r.error.issues.map((i) => `${i.path.join(".") || "(top)"}: ${i.message}`);
  fail(`${what} is invalid: ${issues.join("; ")}`);
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, "utf8");
  } catch (e) {
    fail(`cannot read ${what} ${path}: ${(e as NodeJS.ErrnoException).code ?? "error"}`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch {
    fail(`${what} ${path} is not valid JSON`);
  }
}

const n = (x: number | null, d = 3): string => (x === null ? "-" : x.toFixed(d));
function box(b: Bounds): string {
  return `X ${n(b.min.x)} .. ${n(b.max.x)}  Y ${n(b.min.y)} .. ${n(b.max.y)}  Z ${n(b.min.z)} .. ${n(b.max.z)}`;
}
function hms(s: number): string {
  const t = Math.round(s);
  const h = Math.floor(t / 3600);
  const m = Math.floor((t % 3600) / 60);
  return `${h > 0 ? `${h}h ` : ""}${m}m ${t % 60}s`;
}

function report(file: string, a: Analysis): string {
  const u = a.units;
  const out: string[] = [];
  out.push(`${file}: ${a.lineCount} lines, ${a.byteLength} bytes, units ${u}${a.unitsDeclared ? "" : " (assumed)"}, dialect ${a.dialect}`);
  const c = a.coverage;
  if (c.evaluatedShare < 1) {
    const shown = c.lines.slice(0, 10).join(", ") + (c.notEvaluatedLines > 10 ? ", ..." : "");
    out.push(`PARTIAL: ${(c.evaluatedShare * 100).toFixed(1)}% of ${c.codeLines} code lines evaluated; ${c.notEvaluatedLines} not (lines ${shown})`);
  }
  if (a.programNumber !== null) out.push(`program O${a.programNumber}`);
  out.push(`bounds          ${box(a.bounds)}`);
  out.push(`cutting bounds  ${box(a.cuttingBounds)}`);
  out.push(`feed length ${a.feedLength.toFixed(1)} ${u}, rapid length ${a.rapidLength.toFixed(1)} ${u}`);
  const t = a.time;
  out.push(`time: total ${hms(t.totalSeconds)} (feed ${hms(t.feedSeconds)}, rapid ${hms(t.rapidSeconds)}, tool changes ${hms(t.toolChangeSeconds)}, dwell ${hms(t.dwellSeconds)})`);
  if (a.stops.programStops + a.stops.optionalStops > 0) {
    out.push(`stops: ${a.stops.programStops} M0, ${a.stops.optionalStops} M1 (lines ${a.stops.lines.slice(0, 10).join(", ")})`);
  }
  out.push(`tool changes: ${a.toolChangeCount}, order ${a.toolOrder}, parts ${a.parts}`);
  out.push("");
  out.push("work offsets");
  for (const o of a.workOffsets) {
    out.push(`  ${o.code.padEnd(10)} first line ${o.firstLine ?? "-"}  tools ${o.tools.map((x) => `T${x}`).join(" ") || "-"}  time ${hms(o.time.totalSeconds)}`);
    out.push(`             ${box(o.bounds)}${o.origin ? `  origin ${o.origin.x}, ${o.origin.y}, ${o.origin.z}` : ""}`);
  }
  out.push("");
  out.push("tools");
  for (const tl of a.tools) {
    out.push(`  T${String(tl.number).padEnd(4)} ${tl.description ?? "(no description)"}`);
    out.push(`        H ${tl.lengthOffsets.join(",") || "-"}  D ${tl.diameterOffsets.join(",") || "-"}  S ${tl.spindle ? `${tl.spindle.min}-${tl.spindle.max}` : "-"}  F ${tl.feed ? `${tl.feed.min}-${tl.feed.max}` : "-"}  lowest Z ${n(tl.lowestZ)}  lines ${tl.firstLine}-${tl.lastLine}  cut ${tl.feedLength.toFixed(1)} ${u}  time ${hms(tl.time.totalSeconds)}`);
  }
  out.push("");
  if (a.findings.length === 0) out.push("no findings");
  else {
    out.push("findings");
    for (const f of a.findings) out.push(`  ${String(f.line).padStart(7)}  ${f.severity.padEnd(7)} ${f.rule.padEnd(22)} ${f.message}`);
    for (const c of a.findingCounts) if (c.count > c.listed) out.push(`  ${c.rule}: ${c.count - c.listed} more not listed`);
  }
  if (a.assumptions.length) {
    out.push("");
    out.push("assumptions");
    for (const s of a.assumptions) out.push(`  ${s}`);
  }
  out.push(`toolpath: ${a.toolpath.segmentCount} segments, chord tolerance ${a.toolpath.chordTolerance} ${u}`);
  return out.join("\n") + "\n";
}

function main(): void {
  const { file, opts, json } = parseArgs(process.argv.slice(2));
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    fail(`cannot read ${file}: ${(e as NodeJS.ErrnoException).code ?? "error"}`);
  }
  const check = checkTextProgram(bytes);
  if (!check.ok) fail(`${file}: ${check.reason}`);
  const a = analyzeProgram(bytes, opts);
  if (json) process.stdout.write(JSON.stringify(serializeAnalysis(a)) + "\n");
  else process.stdout.write(report(file, a));
  process.exitCode = a.findings.some((f) => f.severity === "error") || a.findingCounts.some((c) => c.severity === "error") ? 1 : 0;
}

main();
