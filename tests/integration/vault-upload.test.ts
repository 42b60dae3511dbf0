import { count, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, programFiles, programs, revisions } from "@/db/schema";
import * as revisionRoute from "@/app/api/revisions/[id]/route";
import * as pushRoute from "@/app/api/revisions/route";
import { env } from "@/lib/env";
import { benchProgram } from "@/scripts/bench-program";
import { readFileBytes } from "@/lib/jobs/analysis";
import { actAs, jsonRequest, params } from "./helpers";
import { makeMachine, makeProgram, ncProgram, sha256, upload, uploadRequest } from "./vault-helpers";

async function stored(programId: number) {
  const [r] = await db().select({ n: count() }).from(revisions).where(eq(revisions.programId, programId));
  const [f] = await db().select({ n: count() }).from(programFiles);
  return { revisions: r!.n, files: f!.n };
}

describe("uploads", () => {
  let programId = 0;
  beforeAll(async () => {
    await actAs("programmer");
    ({ programId } = await makeProgram());
  });

  it("20 concurrent uploads to one program get revisions 1..20, each with the SHA-256 sent", async () => {
    await actAs("programmer");
    const { programId: pid } = await makeProgram();
    const bodies = Array.from({ length: 20 }, (_, i) => ncProgram(`concurrent ${i}`));
    const results = await Promise.all(bodies.map((b) => upload(pid, b, { "x-content-sha256": sha256(b) })));
    expect(results.map((r) => r.number).sort((a, b) => a - b)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    const rows = await db().select({ number: revisions.number, sha256: revisions.sha256 }).from(revisions).where(eq(revisions.programId, pid));
    expect(rows).toHaveLength(20);
    for (const r of results) {
      const body = bodies[results.indexOf(r)]!;
      expect(r.sha256).toBe(sha256(body));
      expect(rows.find((x) => x.number === r.number)?.sha256).toBe(sha256(body));
    }
    const [program] = await db().select().from(programs).where(eq(programs.id, pid));
    expect(program!.lastRevisionNumber).toBe(20);
    const latest = results.find((r) => r.number === 20)!;
    expect(program!.latestRevisionId).toBe(latest.id);
    const events = await db().select({ n: count() }).from(auditEvents).where(sql`${auditEvents.action} = 'revision.upload' and ${auditEvents.details}->>'programId' = ${String(pid)}`);
    expect(events[0]!.n).toBe(20);
  });

  const bad: { name: string; body: Uint8Array; headers?: Record<string, string>; status: number; error: RegExp }[] = [
    { name: "0 bytes", body: new Uint8Array(0), status: 422, error: /empty/i },
    { name: "NUL bytes", body: new TextEncoder().encode("G0 X1\n\u0000G1 X2\n"), status: 415, error: /NUL/ },
    { name: "binary control bytes", body: Uint8Array.from([0x47, 0x30, 0x01, 0x02, 0x0a]), status: 415, error: /binary control byte 0x01/ },
    { name: "invalid UTF-8", body: Uint8Array.from([0x47, 0x30, 0x20, 0xff, 0xfe, 0x0a]), status: 422, error: /UTF-8/ },
    { name: "a SHA-256 that does not match", body: new TextEncoder().encode(ncProgram()), headers: { "x-content-sha256": "0".repeat(64) }, status: 422, error: /does not match/ },
    { name: "a malformed SHA-256", body: new TextEncoder().encode(ncProgram()), headers: { "x-content-sha256": "xyz" }, status: 400, error: /64 hexadecimal/ },
    { name: "a JSON body", body: new TextEncoder().encode("{}"), headers: { "content-type": "application/json" }, status: 415, error: /text\/plain/ },
    { name: "a Content-Length over the limit", body: new TextEncoder().encode("G0 X1\n"), headers: { "content-length": String(200 * 1024 * 1024) }, status: 413, error: /larger than the limit/ },
  ];
  for (const c of bad) {
    it(`refuses ${c.name} with ${c.status} and stores nothing`, async () => {
      await actAs("programmer");
      const before = await stored(programId);
      const res = await uploadRequest(programId, c.body, c.headers);
      expect(res.status).toBe(c.status);
      const body = (await res.json()) as { error: string };
      expect(body.error).toMatch(c.error);
      expect(await stored(programId)).toEqual(before);
    });
  }

  it("stops reading at the first byte over the limit (413) and stores nothing", async () => {
    await actAs("programmer");
    const before = await stored(programId);
    const chunk = new Uint8Array(1024 * 1024).fill(0x47);
    let pulled = 0;
    const endless = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled++;
        controller.enqueue(chunk);
      },
    });
    const req = new Request(`http://localhost/api/programs/${programId}/revisions`, {
      method: "POST",
      headers: { "content-type": "application/octet-stream" },
      body: endless,
      duplex: "half",
    } as RequestInit);
    const { POST } = await import("@/app/api/programs/[id]/revisions/route");
    const res = await POST(req, params({ id: String(programId) }));
    expect(res.status).toBe(413);
    const limitChunks = Math.ceil(env().uploadMaxBytes / chunk.length);
    expect(pulled).toBeGreaterThan(limitChunks - 1);
    expect(pulled).toBeLessThanOrEqual(limitChunks + 3);
    expect(await stored(programId)).toEqual(before);
  });

  it("streams a large upload of known length into PostgreSQL as it arrives, and leaves no staged bytes", async () => {
    await actAs("programmer");
    const { programFileUploads } = await import("@/db/schema");
    const staged = async () => (await db().select({ n: count() }).from(programFileUploads))[0]!.n;
    const big = Buffer.from(benchProgram(250_000));
    expect(big.length).toBeGreaterThan(4 * 1024 * 1024);
    const res0 = await uploadRequest(programId, big, { "content-length": String(big.length), "x-content-sha256": sha256(big) });
    expect(res0.status).toBe(201);
    expect(res0.headers.get("server-timing")).toContain("staged");
    const rev = ((await res0.json()) as { revision: { sha256: string } }).revision;
    expect(rev.sha256).toBe(sha256(big));
    // Read from the table, not the in-memory cache.
    const [row] = await db().execute<{ same: boolean }>(sql`select bytes = ${big} as same from program_files where sha256 = ${rev.sha256}`).then((r) => r.rows);
    expect(row!.same).toBe(true);
    expect(await staged()).toBe(0);
    // Refused after the bytes were streamed (a NUL in the last line): nothing stored, nothing staged.
    const before = await stored(programId);
    const bad = Buffer.concat([Buffer.from(benchProgram(250_000)), Buffer.from("G0 X1\u0000\n")]);
    const res = await uploadRequest(programId, bad, { "content-length": String(bad.length) });
    expect(res.status).toBe(415);
    expect(await stored(programId)).toEqual(before);
    expect(await staged()).toBe(0);
  });

  it("stores a 10,000-character line safely", async () => {
    await actAs("programmer");
    const text = ncProgram("long line", `(${"X".repeat(10_000)})`);
    const rev = await upload(programId, text);
    const [row] = await db().select({ size: revisions.size, lineCount: revisions.lineCount }).from(revisions).where(eq(revisions.id, rev.id));
    expect(row).toEqual({ size: Buffer.byteLength(text), lineCount: 15 });
    expect((await readFileBytes(db(), rev.sha256))?.toString("utf8")).toBe(text);
  });

  const names: [string, string][] = [
    ["../../etc/passwd", "passwd"],
    ["..\\..\\windows\\system32\\O1001.nc", "O1001.nc"],
    ["C:\\cam\\posts\\out\\O2207 op10.nc", "O2207 op10.nc"],
    ["bell\u0007 and\u001b[31m red\u0000.nc", "bell and[31m red.nc"],
    ["right-to-left \u202Ecn.exe", "right-to-left cn.exe"],
    [".hidden.nc", "hidden.nc"],
    ["..", "program.nc"],
    [`${"L".repeat(300)}.nc`, `${"L".repeat(117)}.nc`],
  ];
  for (const [raw, clean] of names) {
    it(`keeps the file name ${JSON.stringify(raw.slice(0, 40))} only as the label ${JSON.stringify(clean.slice(0, 40))}`, async () => {
      await actAs("programmer");
      const rev = await upload(programId, ncProgram(), { "x-file-name": encodeURIComponent(raw) });
      const [row] = await db().select({ fileName: revisions.fileName }).from(revisions).where(eq(revisions.id, rev.id));
      expect(row!.fileName).toBe(clean);
      expect(row!.fileName.length).toBeLessThanOrEqual(120);
    });
  }

  it("takes a multipart field `file` with its file name", async () => {
    await actAs("programmer");
    const text = ncProgram("multipart");
    const form = new FormData();
    form.set("note", "ignored field");
    form.set("file", new Blob([text], { type: "text/plain" }), "../cam/O1001.nc");
    const req = new Request(`http://localhost/api/programs/${programId}/revisions`, { method: "POST", body: form });
    const { POST } = await import("@/app/api/programs/[id]/revisions/route");
    const res = await POST(req, params({ id: String(programId) }));
    expect(res.status).toBe(201);
    const { revision } = (await res.json()) as { revision: { sha256: string; fileName: string } };
    expect(revision).toMatchObject({ sha256: sha256(text), fileName: "O1001.nc" });
  });

  it("refuses a multipart body without a `file` field", async () => {
    await actAs("programmer");
    const form = new FormData();
    form.set("program", new Blob(["G0 X1\n"]), "a.nc");
    const req = new Request(`http://localhost/api/programs/${programId}/revisions`, { method: "POST", body: form });
    const { POST } = await import("@/app/api/programs/[id]/revisions/route");
    const res = await POST(req, params({ id: String(programId) }));
    expect(res.status).toBe(422);
  });

  it("answers 404 for a missing program before reading the body", async () => {
    await actAs("programmer");
    const res = await uploadRequest(2_000_000_000, ncProgram());
    expect(res.status).toBe(404);
  });

  it("keeps identical uploads in one file row, and removes the bytes with the last draft that used them", async () => {
    await actAs("programmer");
    const text = ncProgram(`shared bytes ${Date.now()} ${Math.random()}`);
    const a = await upload(programId, text);
    const b = await upload(programId, text);
    const files = () => db().select({ n: count() }).from(programFiles).where(eq(programFiles.sha256, sha256(text)));
    expect((await files())[0]!.n).toBe(1);
    const del = (id: number) => revisionRoute.DELETE(jsonRequest("DELETE"), params({ id: String(id) }));
    expect((await del(a.id)).status).toBe(200);
    expect((await files())[0]!.n).toBe(1);
    expect((await del(b.id)).status).toBe(200);
    expect((await files())[0]!.n).toBe(0);
    // The numbers are not given out again.
    const c = await upload(programId, text);
    expect(c.number).toBe(b.number + 1);
    const events = await db().select().from(auditEvents).where(sql`${auditEvents.action} = 'revision.delete-draft' and ${auditEvents.objectId} = ${String(b.id)}`);
    expect(events[0]!.details).toMatchObject({ programId, bytesRemoved: true });
  });

  it("lets only the uploader or an admin delete a draft", async () => {
    await actAs("programmer");
    const rev = await upload(programId, ncProgram());
    await actAs("programmer");
    expect((await revisionRoute.DELETE(jsonRequest("DELETE"), params({ id: String(rev.id) }))).status).toBe(403);
    await actAs("admin");
    expect((await revisionRoute.DELETE(jsonRequest("DELETE"), params({ id: String(rev.id) }))).status).toBe(200);
  });

  it("finds or creates the program by number for a CAM push", async () => {
    await actAs("programmer");
    const machineId = await makeMachine();
    const number = `O${Math.floor(Math.random() * 9000) + 1000}`;
    const push = (qs: string, body: string) =>
      pushRoute.POST(new Request(`http://localhost/api/revisions?${qs}`, { method: "POST", headers: { "content-type": "text/plain" }, body }), undefined);
    const noPart = await push(`program=${number}&machine=${machineId}`, ncProgram());
    expect(noPart.status).toBe(422);
    const first = await push(`program=${number}&machine=${machineId}&part=PUSH-${number}&title=Pushed`, ncProgram());
    expect(first.status).toBe(201);
    const one = (await first.json()) as { revision: { number: number; programId: number }; programCreated: boolean };
    expect(one).toMatchObject({ programCreated: true, revision: { number: 1 } });
    const second = await push(`program=${number.toLowerCase()}&machine=${machineId}`, ncProgram());
    const two = (await second.json()) as { revision: { number: number; programId: number }; programCreated: boolean };
    expect(two).toMatchObject({ programCreated: false, revision: { number: 2, programId: one.revision.programId } });
    const badMachine = await push(`program=${number}&machine=no-such-machine&part=X`, ncProgram());
    expect(badMachine.status).toBe(422);
  });
});
