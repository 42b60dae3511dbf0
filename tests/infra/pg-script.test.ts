import { execFile } from "node:child_process";
import { promisify } from "node:util";
import pg from "pg";
import { describe, expect, it } from "vitest";

const run = promisify(execFile);

/** Runs scripts/pg.sh against the test cluster that `npm test` started. */
async function pgScript(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run("bash", ["scripts/pg.sh", ...args], {
      env: { ...process.env, CYCLEGATE_PG_CLUSTER: "test" },
    });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const e = error as { code?: number; stdout?: string; stderr?: string };
    return { code: e.code ?? -1, stdout: e.stdout ?? "", stderr: e.stderr ?? "" };
  }
}

const describeWithDb = process.env.DATABASE_URL ? describe : describe.skip;

describeWithDb("scripts/pg.sh on the running test cluster", () => {
  it("reports the cluster as running on its loopback port", async () => {
    const port = new URL(process.env.DATABASE_URL!).port;
    const result = await pgScript("status");
    expect(result.code).toBe(0);
    expect(result.stdout).toContain(`running: test cluster on 127.0.0.1:${port}`);
  });

  it("prints the same URL npm test handed to the tests", async () => {
    const result = await pgScript("url");
    expect(result.stdout.trim()).toBe(process.env.DATABASE_URL);
  });

  it("treats a second start as a no-op", async () => {
    const result = await pgScript("start");
    expect(result.code).toBe(0);
    expect(result.stderr).toContain("already running");
  });

  it("creates a database once and can connect to it with the generated password", async () => {
    const first = await pgScript("ensure-db", "cyclegate_infra_probe");
    const second = await pgScript("ensure-db", "cyclegate_infra_probe");
    expect(first.code).toBe(0);
    expect(second.stdout).toBe(first.stdout);
    const client = new pg.Client({ connectionString: first.stdout.trim() });
    await client.connect();
    try {
      const { rows } = await client.query<{ db: string; fsync: string }>(
        "select current_database() as db, current_setting('fsync') as fsync",
      );
      expect(rows[0]).toEqual({ db: "cyclegate_infra_probe", fsync: "off" });
    } finally {
      await client.end();
    }
  });

  it("refuses a wrong password over TCP", async () => {
    const url = new URL(process.env.DATABASE_URL!);
    url.password = "not-the-password";
    const client = new pg.Client({ connectionString: url.toString() });
    await expect(client.connect()).rejects.toThrow(/password authentication failed/);
  });

  it("rejects a database name that is not a plain identifier", async () => {
    const result = await pgScript("ensure-db", "bad name; drop");
    expect(result.code).toBe(1);
    expect(result.stderr).toContain("database name must match");
  });

  it("never destroys the main cluster", async () => {
    try {
      await run("bash", ["scripts/pg.sh", "destroy"], { env: { ...process.env, CYCLEGATE_PG_CLUSTER: "main" } });
      expect.unreachable("destroy on the main cluster should fail");
    } catch (error) {
      expect((error as { stderr: string }).stderr).toContain("only removes the throwaway test cluster");
    }
  });

  it("answers an unknown command with its usage and status 2", async () => {
    const result = await pgScript("restart-everything");
    expect(result.code).toBe(2);
    expect(result.stderr).toContain("usage: bash scripts/pg.sh");
  });
});
