import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { DEMO_MACHINES } from "../db/demo-data";
import type { NewMachine } from "../db/schema";
import { analyzeProgram } from "./gcode";
import { machineProfileSchema, toMachineProfile, workOffsetValuesSchema, type MachineFields } from "./machine-profile";

const root = join(import.meta.dirname, "..");
const cli = (...args: string[]) =>
  spawnSync("npm", ["run", "--silent", "analyze", "--", ...args], { cwd: root, encoding: "utf8", timeout: 60_000 });

describe("machine profile", () => {
  it("every demo machine row maps to a valid engine profile", () => {
    for (const m of DEMO_MACHINES) {
      const profile = toMachineProfile({ hMustEqualT: true, notes: "", ...m } as MachineFields);
      expect(machineProfileSchema.safeParse(profile).success).toBe(true);
      expect(profile.travel.x).toEqual({ min: m.travelXMin, max: m.travelXMax });
    }
  });

  it("refuses a partial profile, naming each missing field, and inverted travel", () => {
    const r = machineProfileSchema.safeParse({ units: "mm", travel: { x: { min: 0, max: -1 } } });
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join("."));
    for (const p of ["travel.x", "travel.y", "rapidRate", "hMustEqualT", "workOffsetCount"]) expect(paths).toContain(p);
  });

  it("carries the dialect and the arc tolerance; a row without a tolerance leaves the dialect's default", () => {
    const [bench, vmc] = DEMO_MACHINES as [NewMachine, NewMachine];
    const withTol = toMachineProfile({ ...bench, notes: "", dialect: "strict-ngc", arcTolerance: 0.05 } as MachineFields);
    expect(withTol).toMatchObject({ dialect: "strict-ngc", arcTolerance: 0.05 });
    const without = toMachineProfile({ ...vmc, notes: "", dialect: "common", arcTolerance: null } as MachineFields);
    expect(without.dialect).toBe("common");
    expect("arcTolerance" in without).toBe(false);
    expect(machineProfileSchema.safeParse(withTol).success).toBe(true);
    expect(machineProfileSchema.safeParse({ ...withTol, dialect: "loose" }).success).toBe(false);
    expect(machineProfileSchema.safeParse({ ...withTol, arcTolerance: 0 }).success).toBe(false);
  });

  it("work offset values take G54-G59, G59.1-G59.3 and G54.1 Pn keys only", () => {
    expect(workOffsetValuesSchema.safeParse({ G54: { x: 1, y: 2, z: 3 }, "G59.3": { x: 0, y: 0, z: 0 }, "G54.1 P12": { x: 0, y: 0, z: 0 } }).success).toBe(true);
    expect(workOffsetValuesSchema.safeParse({ G53: { x: 0, y: 0, z: 0 } }).success).toBe(false);
    expect(workOffsetValuesSchema.safeParse({ G54: { x: 0, y: 0 } }).success).toBe(false);
  });

  it("a demo machine's profile drives the time estimate: its tool change time is counted", () => {
    const bench = DEMO_MACHINES[0]!;
    const profile = toMachineProfile({ hMustEqualT: true, notes: "", ...bench } as MachineFields);
    const a = analyzeProgram("G21 G90 G54\nT1 M6\nT2 M6\nM30\n", { machine: profile });
    expect(a.time.toolChangeSeconds).toBeCloseTo(2 * bench.toolChangeSeconds, 9);
  });
});

describe("analyze CLI options", () => {
  const dir = mkdtempSync(join(tmpdir(), "cg-cli-"));
  const program = join(dir, "p.nc");
  writeFileSync(program, "G21 G90 G54\nG0 X0 Y0 Z5\nM30\n");

  it("a partial --machine file exits 2 with one line naming the bad fields", { timeout: 60_000 }, () => {
    const file = join(dir, "partial.json");
    writeFileSync(file, JSON.stringify({ units: "mm" }));
    const r = cli(program, "--machine", file);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/machine profile is invalid: .*travel.*rapidRate/);
  });

  it("--dialect picks the dialect, and refuses a name it does not know", { timeout: 60_000 }, () => {
    const file = join(dir, "safe-start.nc");
    writeFileSync(file, "G0 G17 G40 G49 G80 G90\nG21 G54\nG0 X0 Y0 Z5\nM30\n");
    const common = cli(file, "--json");
    expect(common.status).toBe(0);
    expect(JSON.parse(common.stdout).dialect).toBe("common");
    // [NIST] 3.4: G0 and G80 on one line are both motion-group words.
    const strict = cli(file, "--dialect", "strict-ngc");
    expect(strict.status).toBe(1);
    expect(strict.stdout).toMatch(/dialect strict-ngc/);
    expect(strict.stdout).toMatch(/modal-conflict/);
    const bad = cli(file, "--dialect", "loose");
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--dialect needs one of common, strict-ngc/);
  });

  it("an unknown offset code in --offsets exits 2", { timeout: 60_000 }, () => {
    const file = join(dir, "offsets.json");
    writeFileSync(file, JSON.stringify({ G99: { x: 0, y: 0, z: 0 } }));
    const r = cli(program, "--offsets", file);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/work offsets is invalid/);
  });
});
