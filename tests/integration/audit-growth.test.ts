/**
 * Item 5: nobody can grow the append-only audit record without limit. Repeated throttled attempts
 * and repeated refusals from one place are rolled up: the first of a 15-minute window is written at
 * once, the rest become one summary row with a count when the window ends. What an anonymous caller
 * can add per address and window is bounded.
 */
import { sql } from "drizzle-orm";
import { beforeEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents } from "@/db/schema";
import * as sessionRoute from "@/app/api/session/route";
import * as auditRoute from "@/app/api/audit/route";
import * as usersRoute from "@/app/api/users/route";
import { actAs, jsonRequest } from "./helpers";
import { requestContext } from "./request-context";

/** As documented: failures allowed per address and window before it is refused. */
const ADDRESS_LIMIT = 50;

const rowsFrom = async (ip: string) =>
  db()
    .select({ action: auditEvents.action, details: auditEvents.details })
    .from(auditEvents)
    .where(sql`${auditEvents.ip} = ${ip}::inet`);

/** Ends every open roll-up window, as 15 minutes passing would (the test cannot wait that long). */
const closeOpenWindows = () => db().execute(sql`update audit_rollups set window_end = now() - interval '1 second'`);

/** The record as a lead reads it through the API. */
async function readRecord(query: string) {
  await actAs("lead");
  const res = await auditRoute.GET(jsonRequest("GET", undefined, `http://localhost/api/audit?${query}`), undefined);
  expect(res.status).toBe(200);
  return ((await res.json()) as { rows: { action: string; ip: string | null; details: Record<string, unknown> }[] }).rows;
}

/** The roll-ups still open, as the API lists them beside the rows. */
async function readCounting() {
  await actAs("lead");
  const res = await auditRoute.GET(jsonRequest("GET", undefined, "http://localhost/api/audit?page=1"), undefined);
  return ((await res.json()) as { counting: { action: string; ip: string | null; repeated: number }[] }).counting;
}

beforeEach(() => requestContext.reset());

describe("throttled sign-ins are rolled up per address", () => {
  it("30 throttled tries with 30 unknown e-mails from a refused address add one row now and one summary later", async () => {
    const ip = "10.50.0.1";
    const tag = Date.now().toString(36);
    requestContext.reset(ip);
    for (let i = 0; i < ADDRESS_LIMIT; i++) {
      await sessionRoute.POST(jsonRequest("POST", { email: `fill-${i}-${tag}@it.cyclegate.test`, password: "guess" }), undefined);
    }
    const before = (await rowsFrom(ip)).length;
    const statuses: number[] = [];
    for (let i = 0; i < 30; i++) {
      requestContext.reset(ip);
      const res = await sessionRoute.POST(jsonRequest("POST", { email: `target-${i}-${tag}@it.cyclegate.test`, password: "guess" }), undefined);
      statuses.push(res.status);
    }
    expect(statuses.every((s) => s === 429)).toBe(true);
    const during = await rowsFrom(ip);
    expect(during.length - before).toBe(1);
    // Bounded: at most one row per verified failure (the address limit) plus the roll-up's two.
    expect(during.length).toBeLessThanOrEqual(ADDRESS_LIMIT + 2);

    // While the window is open, a reader is told what is still being counted.
    const open = await readCounting();
    expect(open.find((c) => c.ip === ip && c.action === "session.sign-in-throttled")?.repeated).toBe(29);

    await closeOpenWindows();
    const record = (await readRecord("action=session.sign-in-throttled")).filter((r) => r.ip === ip);
    expect(record).toHaveLength(2);
    const summary = record.find((r) => r.details.repeated !== undefined);
    expect(summary?.details).toMatchObject({ repeated: 29 });
    const sample = summary?.details.emails as string[];
    expect(sample.length).toBeGreaterThan(0);
    expect(sample.length).toBeLessThanOrEqual(10);
    expect(sample.every((e) => e.startsWith("target-"))).toBe(true);
    expect(typeof summary?.details.firstAt).toBe("string");
    expect(typeof summary?.details.lastAt).toBe("string");
    // Read again: the summary is written once.
    expect((await readRecord("action=session.sign-in-throttled")).filter((r) => r.ip === ip)).toHaveLength(2);
  });
});

describe("refusals are rolled up per caller and permission", () => {
  it("ten refused reads by one operator: one row, then one summary counting the other nine", async () => {
    const op = await actAs("operator");
    for (let i = 0; i < 10; i++) {
      expect((await usersRoute.GET(jsonRequest("GET"), undefined)).status).toBe(403);
    }
    const mine = () =>
      db()
        .select({ details: auditEvents.details })
        .from(auditEvents)
        .where(sql`${auditEvents.actorId} = ${op!.id} and ${auditEvents.action} = 'access.refused'`);
    expect(await mine()).toEqual([{ details: { permission: "manageUsers", role: "operator" } }]);
    await closeOpenWindows();
    await readRecord("action=access.refused");
    const rows = await mine();
    expect(rows).toHaveLength(2);
    expect(rows.map((r) => (r.details as { repeated?: number }).repeated)).toContain(9);
  });
});
