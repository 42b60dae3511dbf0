/**
 * Prints the line the CI reads at the end of `npm test`: `N passed, N failed` (plus `, N skipped`
 * when tests were skipped), preceded by the names of the failures. Exits 1 when anything failed.
 *
 *   node --import tsx scripts/test-summary.ts --json .test-results/vitest.json --exit-code <vitest status>
 *   node --import tsx scripts/test-summary.ts --boot-failed "<what failed>"
 *
 * A test file that fails to load, or a vitest run that fails for a reason outside any test
 * (an unhandled error, no test files), counts as one failure, so the line never reads
 * "0 failed" for a run that did not pass.
 */
import { readFileSync } from "node:fs";
import { relative } from "node:path";

interface AssertionResult {
  status: string;
  fullName?: string;
  title?: string;
}

interface FileResult {
  name: string;
  status: string;
  message?: string;
  assertionResults?: AssertionResult[];
}

interface VitestJson {
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests: number;
  numTodoTests?: number;
  testResults?: FileResult[];
}

export interface Summary {
  passed: number;
  failed: number;
  skipped: number;
  failures: string[];
}

/** Counts a vitest JSON report; `exitCode` is vitest's own status. */
export function summarize(report: VitestJson, exitCode: number): Summary {
  const failures: string[] = [];
  let brokenFiles = 0;
  for (const file of report.testResults ?? []) {
    const name = relative(process.cwd(), file.name);
    const failedTests = (file.assertionResults ?? []).filter((a) => a.status === "failed");
    for (const test of failedTests) failures.push(`${name} > ${test.fullName ?? test.title ?? "?"}`);
    if (file.status === "failed" && failedTests.length === 0) {
      brokenFiles += 1;
      const reason = (file.message ?? "").split("\n")[0]?.trim();
      failures.push(`${name} (the file failed${reason ? `: ${reason}` : ""})`);
    }
  }
  let failed = report.numFailedTests + brokenFiles;
  if (exitCode !== 0 && failed === 0) {
    failed = 1;
    failures.push(`vitest exited with status ${exitCode} outside any test (see its output above)`);
  }
  return {
    passed: report.numPassedTests,
    failed,
    skipped: report.numPendingTests + (report.numTodoTests ?? 0),
    failures,
  };
}

/** The CI's line: `N passed, N failed[, N skipped]`. */
export function formatSummary(s: Pick<Summary, "passed" | "failed" | "skipped">): string {
  return `${s.passed} passed, ${s.failed} failed${s.skipped > 0 ? `, ${s.skipped} skipped` : ""}`;
}

function readArgs(argv: string[]): Map<string, string> {
  const args = new Map<string, string>();
  for (let i = 0; i < argv.length; i += 2) {
    const key = argv[i];
    const value = argv[i + 1];
    if (key?.startsWith("--") && value !== undefined) args.set(key, value);
  }
  return args;
}

function main(): number {
  const args = readArgs(process.argv.slice(2));
  const bootFailed = args.get("--boot-failed");
  if (bootFailed !== undefined) {
    console.log(`\nnot run: ${bootFailed}`);
    console.log(formatSummary({ passed: 0, failed: 1, skipped: 0 }));
    return 1;
  }
  const file = args.get("--json") ?? ".test-results/vitest.json";
  const exitCode = Number(args.get("--exit-code") ?? "0");
  let report: VitestJson;
  try {
    report = JSON.parse(readFileSync(file, "utf8")) as VitestJson;
    if (typeof report.numPassedTests !== "number" || typeof report.numFailedTests !== "number") {
      throw new Error("it is not a vitest JSON report");
    }
  } catch (error) {
    console.log(`\nno test report in ${file}: ${error instanceof Error ? error.message : String(error)}`);
    console.log(formatSummary({ passed: 0, failed: 1, skipped: 0 }));
    return 1;
  }
  const summary = summarize(report, Number.isInteger(exitCode) ? exitCode : 1);
  if (summary.failures.length > 0) {
    console.log("\nfailed:");
    for (const line of summary.failures) console.log(`  ${line}`);
  }
  console.log(formatSummary(summary));
  return summary.failed > 0 ? 1 : 0;
}

if (process.argv[1]?.endsWith("test-summary.ts")) {
  process.exitCode = main();
}
