import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, revisions } from "@/db/schema";
import * as programsRoute from "@/app/api/programs/route";
import * as programEventsRoute from "@/app/api/programs/[id]/events/route";
import * as revisionRoute from "@/app/api/revisions/[id]/route";
import * as fileRoute from "@/app/api/revisions/[id]/file/route";
import * as compareRoute from "@/app/api/revisions/[id]/compare/[other]/route";
import * as sessionRoute from "@/app/api/session/route";
import * as tokensRoute from "@/app/api/tokens/route";
import * as tokenRoute from "@/app/api/tokens/[id]/route";
import * as workOffsetsRoute from "@/app/api/machines/[id]/work-offsets/route";
import * as outboxRoute from "@/app/api/outbox/route";
import { actAs, jsonRequest, params } from "./helpers";
import { ensureWorker, makeProgram, ncProgram, sha256, stopWorker, upload, waitForAnalysis } from "./vault-helpers";

beforeAll(async () => {
  await ensureWorker();
});
afterAll(async () => {
  await stopWorker();
});

const get = (url: string, headers: Record<string, string> = {}) => new Request(`http://localhost${url}`, { headers });

describe("API tokens", () => {
  it("are shown once, stored hashed, work on JSON routes only, record first use, and stop at revocation", async () => {
    const me = await actAs("programmer");
    const created = await tokensRoute.POST(jsonRequest("POST", { name: "CAM post" }), undefined);
    expect(created.status).toBe(201);
    const { token } = (await created.json()) as { token: { id: number; token: string; prefix: string } };
    expect(token.token).toMatch(/^cgt_[A-Za-z0-9_-]{43}$/);
    const listed = (await (await tokensRoute.GET(jsonRequest("GET"), undefined)).json()) as { tokens: Record<string, unknown>[] };
    expect(listed.tokens[0]).not.toHaveProperty("token");
    expect(listed.tokens[0]).toMatchObject({ id: token.id, name: "CAM post", prefix: token.prefix, lastUsedAt: null });
    // The stored value is the hash only.
    const { apiTokens } = await import("@/db/schema");
    const [row] = await db().select().from(apiTokens).where(eq(apiTokens.id, token.id));
    expect(row!.tokenHash).toBe(sha256(token.token));
    expect(JSON.stringify(row)).not.toContain(token.token);

    // A signed-out caller with the token: accepted by a JSON route handler.
    await actAs("anonymous");
    const auth = { authorization: `Bearer ${token.token}` };
    const res = await sessionRoute.GET(get("/api/session", auth), undefined);
    expect(res.status).toBe(200);
    expect(((await res.json()) as { user: { email: string } }).user.email).toBe(me!.email);
    await sessionRoute.GET(get("/api/session", auth), undefined);
    const firstUse = await db().select().from(auditEvents).where(and(eq(auditEvents.action, "token.first-use"), eq(auditEvents.objectId, String(token.id))));
    expect(firstUse).toHaveLength(1);
    // Not outside route(): the session lookup of a page or action ignores the header.
    const { getCurrentUser } = await import("@/lib/auth/session");
    const { requestContext } = await import("./request-context");
    requestContext.requestHeaders.set("authorization", auth.authorization);
    expect(await getCurrentUser()).toBeNull();
    // A token cannot make tokens.
    expect((await tokensRoute.POST(new Request("http://localhost/api/tokens", { method: "POST", headers: { ...auth, "content-type": "application/json" }, body: '{"name":"x"}' }), undefined)).status).toBe(403);

    await actAs("programmer");
    // Someone else's token: 404.
    expect((await tokenRoute.DELETE(jsonRequest("DELETE"), params({ id: String(token.id) }))).status).toBe(404);
    requestContext.reset();
    const { signIn } = await import("@/lib/auth/sign-in");
    await signIn(me!.email, me!.password);
    expect((await tokenRoute.DELETE(jsonRequest("DELETE"), params({ id: String(token.id) }))).status).toBe(200);
    expect((await tokenRoute.DELETE(jsonRequest("DELETE"), params({ id: String(token.id) }))).status).toBe(409);
    await actAs("anonymous");
    expect((await sessionRoute.GET(get("/api/session", auth), undefined)).status).toBe(401);
    expect((await sessionRoute.GET(get("/api/session", { authorization: "Bearer cgt_unknown" }), undefined)).status).toBe(401);
  });
});

describe("reading programs and revisions", () => {
  it("lists with search, filters, sort and pages; shows a revision; downloads the exact bytes with an RFC 6266 name; audits it", async () => {
    await actAs("programmer");
    const { programId, machineId } = await makeProgram();
    const text = `${ncProgram("download")}\r\n(CRLF AND UTF-8: Ø 12 mm)\r\n`;
    const rev = await upload(programId, text, { "x-file-name": encodeURIComponent("Deckel Ø12 \"final\".nc") });
    await waitForAnalysis(rev.id);

    await actAs("operator");
    const list = async (qs: string) =>
      (await (await programsRoute.GET(get(`/api/programs?${qs}`), undefined)).json()) as { programs: { id: number; latest: { id: number } | null }[]; total: number };
    expect((await list(`machine=${machineId}&tool=1`)).programs.map((p) => p.id)).toContain(programId);
    expect((await list(`machine=${machineId}&tool=77`)).programs).toEqual([]);
    expect((await list(`machine=${machineId}&offset=g54&status=draft`)).programs.map((p) => p.latest?.id)).toEqual([rev.id]);
    expect((await list(`machine=${machineId}&rule=over-travel`)).total).toBe(0);
    expect((await list(`machine=${machineId}&sort=programNumber&dir=asc&page=1&pageSize=1`)).programs).toHaveLength(1);
    expect((await programsRoute.GET(get("/api/programs?rule=no-such-rule"), undefined)).status).toBe(422);
    expect((await programsRoute.GET(get("/api/programs?pageSize=1000"), undefined)).status).toBe(422);

    const shown = (await (await revisionRoute.GET(get(`/api/revisions/${rev.id}?result=1`), params({ id: String(rev.id) }))).json()) as {
      revision: { analysis: { state: string }; tools: { number: number }[]; offsets: { code: string }[]; result: { lineCount: number }; can: Record<string, boolean> };
    };
    expect(shown.revision.analysis.state).toBe("done");
    expect(shown.revision.tools.map((t) => t.number)).toEqual([1]);
    expect(shown.revision.offsets.map((o) => o.code)).toEqual(["G54"]);
    expect(shown.revision.can).toEqual({ submit: false, release: false, reject: false, delete: false });
    expect(shown.revision.result.lineCount).toBeGreaterThan(15);

    const file = await fileRoute.GET(get(`/api/revisions/${rev.id}/file`), params({ id: String(rev.id) }));
    expect(file.status).toBe(200);
    const bytes = Buffer.from(await file.arrayBuffer());
    expect(bytes.equals(Buffer.from(text))).toBe(true);
    expect(file.headers.get("x-content-sha256")).toBe(sha256(text));
    expect(file.headers.get("content-disposition")).toBe(
      `attachment; filename="Deckel _12 _final_.nc"; filename*=UTF-8''Deckel%20%C3%9812%20%22final%22.nc`,
    );
    const downloads = await db().select().from(auditEvents).where(and(eq(auditEvents.action, "revision.download"), eq(auditEvents.objectId, String(rev.id))));
    expect(downloads).toHaveLength(1);

    // The code pane reads the same bytes three times: one view event (the rest are counted for the window's summary
    // row), and no download.
    for (let i = 0; i < 3; i++) {
      const viewed = await fileRoute.GET(get(`/api/revisions/${rev.id}/file?purpose=view`), params({ id: String(rev.id) }));
      expect(Buffer.from(await viewed.arrayBuffer()).equals(Buffer.from(text))).toBe(true);
    }
    const byAction = async (action: string) =>
      db().select().from(auditEvents).where(and(eq(auditEvents.action, action), eq(auditEvents.objectId, String(rev.id))));
    expect(await byAction("revision.view")).toHaveLength(1);
    expect(await byAction("revision.download")).toHaveLength(1);

    const events = (await (await programEventsRoute.GET(get(`/api/programs/${programId}/events`), params({ id: String(programId) }))).json()) as { events: { action: string }[] };
    expect(events.events.map((e) => e.action)).toEqual(expect.arrayContaining(["revision.upload", "revision.download", "program.create"]));
  });

  it("compares two revisions: line diff with line numbers and analysis diff", async () => {
    await actAs("programmer");
    const { programId } = await makeProgram();
    const a = await upload(programId, ncProgram("same", "G1 X30"));
    const bText = ncProgram("same", "G1 X35").replace("G54 G0 X0 Y0", "G55 G0 X0 Y0").replace("T1 M6 (D10 END MILL)", "T2 M6 (D6 DRILL)").replace("G43 H1", "G43 H2");
    const b = await upload(programId, bText);
    await Promise.all([waitForAnalysis(a.id), waitForAnalysis(b.id)]);
    await actAs("operator");
    const res = await compareRoute.GET(get(`/api/revisions/${a.id}/compare/${b.id}?context=1`), params({ id: String(a.id), other: String(b.id) }));
    expect(res.status).toBe(200);
    const c = (await res.json()) as {
      lines: { added: number; removed: number; hunks: { lines: { kind: string; a: number | null; b: number | null; text: string }[] }[] };
      analysis: { tools: { added: number[]; removed: number[] }; offsets: { added: string[]; removed: string[] } };
    };
    expect(c.lines.added).toBe(4);
    expect(c.lines.removed).toBe(4);
    expect(c.lines.hunks.flatMap((h) => h.lines)).toContainEqual({ kind: "added", a: null, b: 11, text: "G1 X35" });
    expect(c.analysis.tools).toMatchObject({ added: [2], removed: [1] });
    expect(c.analysis.offsets.added).toEqual(["G55"]);
    expect((await compareRoute.GET(get("/api/revisions/1/compare/999999999"), params({ id: String(a.id), other: "999999999" }))).status).toBe(404);
  });
});

describe("work offsets at the machines", () => {
  it("sets, lists and clears values; refuses bad codes", async () => {
    await actAs("programmer");
    const { machineId } = await makeProgram();
    await actAs("operator");
    const put = (body: unknown) => workOffsetsRoute.PUT(jsonRequest("PUT", body), params({ id: String(machineId) }));
    expect((await put({ code: "g54", x: -250.5, y: -120, z: -300.25 })).status).toBe(200);
    expect((await put({ code: "G54.1 P3", x: 1, y: 2, z: 3 })).status).toBe(200);
    expect((await put({ code: "G53", x: 0, y: 0, z: 0 })).status).toBe(422);
    expect((await put({ code: "G55", x: "a", y: 0, z: 0 })).status).toBe(422);
    const listed = (await (await workOffsetsRoute.GET(jsonRequest("GET"), params({ id: String(machineId) }))).json()) as {
      offsets: { code: string; x: number; setBy: { name: string } }[];
    };
    expect(listed.offsets.map((o) => [o.code, o.x])).toEqual([
      ["G54", -250.5],
      ["G54.1 P3", 1],
    ]);
    expect(listed.offsets[0]!.setBy.name).toBe("Test operator");
    const cleared = await workOffsetsRoute.DELETE(jsonRequest("DELETE", undefined, "http://localhost/api?code=G54"), params({ id: String(machineId) }));
    expect(((await cleared.json()) as { offsets: unknown[] }).offsets).toHaveLength(1);
    expect((await workOffsetsRoute.DELETE(jsonRequest("DELETE", undefined, "http://localhost/api?code=G54"), params({ id: String(machineId) }))).status).toBe(404);
  });
});

describe("outbox", () => {
  it("lists messages with their state and the count per state for an admin", async () => {
    await actAs("admin");
    const res = await outboxRoute.GET(get("/api/outbox"), undefined);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { counts: Record<string, number>; messages: { state: string; recipients: string[] }[] };
    expect(Object.keys(body.counts).sort()).toEqual(["failed", "pending", "sending", "sent"]);
    expect((await outboxRoute.GET(get("/api/outbox?state=lost"), undefined)).status).toBe(422);
  });
});

describe("revision status in lists", () => {
  it("status=released means the program has a released revision", async () => {
    const rows = await db().select({ programId: revisions.programId }).from(revisions).where(eq(revisions.status, "released")).limit(1);
    await actAs("operator");
    const res = (await (await programsRoute.GET(get("/api/programs?status=released&pageSize=100"), undefined)).json()) as { programs: { released: unknown }[] };
    expect(res.programs.every((p) => p.released !== null)).toBe(true);
    if (rows.length > 0) expect(res.programs.length).toBeGreaterThan(0);
  });
});
