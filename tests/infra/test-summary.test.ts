import { execFile } from "node:child_process";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatSummary, summarize } from "../../scripts/test-summary";

const run = promisify(execFile);

function report(files: Array<{ status: string; tests: string[]; message?: string }>) {
  const all = files.flatMap((f) => f.tests);
  return {
    numPassedTests: all.filter((s) => s === "passed").length,
    numFailedTests: all.filter((s) => s === "failed").length,
    numPendingTests: all.filter((s) => s === "skipped" || s === "pending").length,
    numTodoTests: all.filter((s) => s === "todo").length,
    testResults: files.map((f, i) => ({
      name: `${process.cwd()}/tests/f${i}.test.ts`,
      status: f.status,
      message: f.message ?? "",
      assertionResults: f.tests.map((status, j) => ({ status, fullName: `case ${j}` })),
    })),
  };
}

describe("test summary line", () => {
  it("formats counts, adding skipped only when there are some", () => {
    expect(formatSummary({ passed: 12, failed: 0, skipped: 0 })).toBe("12 passed, 0 failed");
    expect(formatSummary({ passed: 3, failed: 2, skipped: 4 })).toBe("3 passed, 2 failed, 4 skipped");
  });

  it("counts passed, failed, skipped and todo tests", () => {
    const s = summarize(report([{ status: "failed", tests: ["passed", "failed", "skipped", "todo"] }]), 1);
    expect(s).toMatchObject({ passed: 1, failed: 1, skipped: 2 });
    expect(s.failures).toEqual(["tests/f0.test.ts > case 1"]);
  });

  it("counts a file that failed to load as a failure", () => {
    const s = summarize(
      report([
        { status: "passed", tests: ["passed"] },
        { status: "failed", tests: [], message: "Cannot find module 'x'\nstack" },
      ]),
      1,
    );
    expect(s).toMatchObject({ passed: 1, failed: 1 });
    expect(s.failures).toEqual(["tests/f1.test.ts (the file failed: Cannot find module 'x')"]);
  });

  it("never reports 0 failed when vitest itself failed", () => {
    const s = summarize(report([{ status: "passed", tests: ["passed", "passed"] }]), 1);
    expect(s.failed).toBe(1);
    expect(summarize(report([{ status: "passed", tests: ["passed"] }]), 0).failed).toBe(0);
  });

  describe("as a command", () => {
    let dir: string;
    beforeAll(async () => {
      dir = await mkdtemp(join(tmpdir(), "cyclegate-summary-"));
    });
    afterAll(async () => {
      await rm(dir, { recursive: true, force: true });
    });

    async function summaryCommand(...args: string[]) {
      try {
        const { stdout } = await run("node", ["--import", "tsx", "scripts/test-summary.ts", ...args]);
        return { code: 0, stdout };
      } catch (error) {
        const e = error as { code: number; stdout: string };
        return { code: e.code, stdout: e.stdout };
      }
    }
    const lastLine = (text: string) => text.trimEnd().split("\n").at(-1);

    it("ends with the counts and exits 0 when everything passed", async () => {
      const file = join(dir, "ok.json");
      await writeFile(file, JSON.stringify(report([{ status: "passed", tests: ["passed", "passed", "skipped"] }])));
      const r = await summaryCommand("--json", file, "--exit-code", "0");
      expect(r.code).toBe(0);
      expect(lastLine(r.stdout)).toBe("2 passed, 0 failed, 1 skipped");
    });

    it("exits 1 and still ends with the counts when a test failed", async () => {
      const file = join(dir, "bad.json");
      await writeFile(file, JSON.stringify(report([{ status: "failed", tests: ["passed", "failed"] }])));
      const r = await summaryCommand("--json", file, "--exit-code", "1");
      expect(r.code).toBe(1);
      expect(lastLine(r.stdout)).toBe("1 passed, 1 failed");
    });

    it("reports one failure when the report is missing or the stack did not come up", async () => {
      const missing = await summaryCommand("--json", join(dir, "nope.json"), "--exit-code", "0");
      expect(missing.code).toBe(1);
      expect(lastLine(missing.stdout)).toBe("0 passed, 1 failed");
      const boot = await summaryCommand("--boot-failed", "build failed");
      expect(boot.code).toBe(1);
      expect(lastLine(boot.stdout)).toBe("0 passed, 1 failed");
      expect(boot.stdout).toContain("not run: build failed");
    });
  });
});
