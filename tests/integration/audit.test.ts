import { sql } from "drizzle-orm";
import { beforeEach, describe, expect, it } from "vitest";
import { db, pool } from "@/db";
import { auditEvents } from "@/db/schema";
import * as auditRoute from "@/app/api/audit/route";
import * as healthRoute from "@/app/api/health/route";
import { recordEvent } from "@/lib/audit";
import { actAs, jsonRequest } from "./helpers";

beforeEach(async () => {
  await actAs("lead");
});

describe("audit_events is append-only", () => {
  /** The database's own message: Drizzle wraps it, and its wrapper quotes the query text. */
  const dbError = async (q: Promise<unknown>) => {
    try {
      await q;
    } catch (e) {
      const cause = (e as { cause?: { message?: string; code?: string } }).cause;
      return { message: cause?.message ?? (e as Error).message, code: cause?.code };
    }
    return null;
  };

  it("refuses UPDATE, DELETE and TRUNCATE, even for the table's owner", async () => {
    await recordEvent({ actor: null, action: "test.kept", objectType: "test", objectId: "1" });
    const update = await dbError(db().execute(sql`update audit_events set action = 'changed' where action = 'test.kept'`));
    const del = await dbError(db().execute(sql`delete from audit_events where action = 'test.kept'`));
    const trunc = await dbError(db().execute(sql`truncate audit_events`));
    expect(update).toEqual({ message: "audit_events is append-only: UPDATE refused", code: "42501" });
    expect(del).toEqual({ message: "audit_events is append-only: DELETE refused", code: "42501" });
    expect(trunc).toEqual({ message: "audit_events is append-only: TRUNCATE refused", code: "42501" });
    const left = await db().select().from(auditEvents).where(sql`${auditEvents.action} = 'test.kept'`);
    expect(left.length).toBeGreaterThan(0);
  });
});

describe("audit listing", () => {
  const get = async (q: string) => {
    const res = await auditRoute.GET(jsonRequest("GET", undefined, `http://localhost/api/audit?${q}`), undefined);
    return { status: res.status, body: (await res.json()) as { rows: { action: string; at: string }[]; total: number; pageSize: number } };
  };

  it("filters by action prefix, object and date range, newest first, paginated on the server", async () => {
    const pageAction = `test.page-${Date.now()}`;
    for (let i = 0; i < 55; i++) {
      await recordEvent({ actor: null, action: pageAction, objectType: "widget", objectId: String(i % 3) });
    }
    const p1 = await get(`action=${pageAction}`);
    expect(p1.status).toBe(200);
    expect(p1.body.total).toBe(55);
    expect(p1.body.rows).toHaveLength(p1.body.pageSize);
    const p2 = await get(`action=${pageAction}&page=2`);
    expect(p2.body.rows).toHaveLength(55 - p1.body.pageSize);
    const times = p1.body.rows.map((r) => r.at);
    expect([...times].sort().reverse()).toEqual(times);

    const obj = await get(`action=${pageAction}&objectType=widget&objectId=1`);
    expect(obj.body.total).toBe(18); // i % 3 == 1 for i in 0..54

    const today = new Date().toISOString().slice(0, 10);
    expect((await get(`action=${pageAction}&from=${today}&to=${today}`)).body.total).toBe(55);
    expect((await get(`action=${pageAction}&to=2000-01-01`)).body.total).toBe(0);
  });

  it("filters by actor e-mail and answers 422 on a bad date", async () => {
    const lead = await actAs("lead");
    await recordEvent({ actor: lead, action: "test.actor" });
    const mine = await get(`actor=${encodeURIComponent(lead!.email)}&action=test.actor`);
    expect(mine.body.total).toBe(1);
    expect((await get("from=yesterday")).status).toBe(422);
  });
});

describe("health", () => {
  it("says db up, and 503 db down when the database cannot be reached", async () => {
    const up = await healthRoute.GET();
    expect(up.status).toBe(200);
    expect(await up.json()).toEqual({ ok: true, db: "up" });
    const g = globalThis as unknown as { cyclegateDb?: unknown; cyclegatePool?: unknown };
    const saved = { db: g.cyclegateDb, pool: g.cyclegatePool };
    const { Pool } = await import("pg");
    const { drizzle } = await import("drizzle-orm/node-postgres");
    const dead = new Pool({ connectionString: "postgres://nobody@127.0.0.1:1/none", connectionTimeoutMillis: 1000 });
    g.cyclegateDb = drizzle(dead);
    try {
      const down = await healthRoute.GET();
      expect(down.status).toBe(503);
      expect(await down.json()).toEqual({ ok: false, db: "down" });
    } finally {
      g.cyclegateDb = saved.db;
      await dead.end();
    }
    expect(pool()).toBe(saved.pool);
  });
});
