import { spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import http from "node:http";
import net from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { benchProgram } from "../../scripts/bench-program";
import { appUrl, BASE_URL, DEMO_PASSWORD } from "./browser";

/** The running test app over real sockets: big uploads, dropped connections, curl with an API token. */

const sha256 = (b: Uint8Array | string) => createHash("sha256").update(b).digest("hex");
let cookie = "";
let programId = 0;
let machineName = "";
let dir = "";
const database = new pg.Pool({ connectionString: process.env.E2E_DATABASE_URL, max: 2 });

async function api(pathName: string, init: RequestInit = {}) {
  const res = await fetch(appUrl(pathName), { ...init, headers: { cookie, ...(init.headers as Record<string, string>) } });
  return res;
}

/**
 * A POST on a connection of its own. fetch would reuse the sign-in's kept-alive connection, which the server may
 * close (after its 5 s keep-alive) while a big body is being generated: a POST is not retried, so the test would
 * fail on EPIPE for a reason that has nothing to do with the app.
 */
function postOnNewConnection(pathName: string, body: Buffer, headers: Record<string, string>): Promise<{ status: number; text: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      appUrl(pathName),
      { method: "POST", agent: false, headers: { cookie, "content-length": String(body.length), ...headers } },
      (res) => {
        let text = "";
        res.setEncoding("utf8");
        res.on("data", (d: string) => (text += d));
        res.on("end", () => resolve({ status: res.statusCode ?? 0, text }));
      },
    );
    req.on("error", reject);
    req.end(body);
  });
}

async function counts() {
  const r = await database.query<{ revisions: string; files: string; staged: string }>(
    `select (select count(*) from revisions) as revisions, (select count(*) from program_files) as files,
            (select count(*) from program_file_uploads) as staged`,
  );
  return { revisions: Number(r.rows[0]!.revisions), files: Number(r.rows[0]!.files), staged: Number(r.rows[0]!.staged) };
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "cyclegate-e2e-"));
  const res = await fetch(appUrl("/api/session"), {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email: "programmer@cyclegate.test", password: DEMO_PASSWORD }),
  });
  expect(res.status).toBe(200);
  cookie = (res.headers.get("set-cookie") ?? "").split(";")[0]!;
  const machines = (await (await api("/api/machines")).json()) as { machines: { id: number; name: string }[] };
  const machine = machines.machines[0]!;
  machineName = machine.name;
  const part = (await (
    await api("/api/parts", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ number: `E2E-${Date.now()}`, name: "E2E part" }) })
  ).json()) as { part: { id: number } };
  const program = await api("/api/programs", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ programNumber: `O${Date.now() % 100000}`, title: "E2E upload", partId: part.part.id, machineId: machine.id }),
  });
  expect(program.status).toBe(201);
  programId = ((await program.json()) as { program: { id: number } }).program.id;
});

afterAll(async () => {
  await database.end();
  await rm(dir, { recursive: true, force: true });
});

describe("uploads over HTTP", () => {
  it("stores a 30 MB upload whole, with the client's SHA-256, and downloads the same bytes", async () => {
    const text = benchProgram(1_400_000);
    const bytes = Buffer.from(text);
    expect(bytes.length).toBeGreaterThan(30_000_000);
    const hash = sha256(bytes);
    const res = await postOnNewConnection(`/api/programs/${programId}/revisions`, bytes, {
      "content-type": "text/plain",
      "x-content-sha256": hash,
      "x-file-name": "big.nc",
    });
    expect(res.status).toBe(201);
    const { revision } = JSON.parse(res.text) as { revision: { id: number; sha256: string; size: number } };
    expect(revision).toMatchObject({ sha256: hash, size: bytes.length });
    const stored = await database.query<{ size: string; len: number }>("select size, octet_length(bytes) as len from program_files where sha256 = $1", [hash]);
    expect(stored.rows[0]).toEqual({ size: String(bytes.length), len: bytes.length });
    const file = await api(`/api/revisions/${revision.id}/file`);
    expect(file.status).toBe(200);
    expect(sha256(Buffer.from(await file.arrayBuffer()))).toBe(hash);
  }, 120_000);

  for (const mode of ["content-length", "chunked"] as const) {
    it(`an upload cut off midway (${mode}) leaves no revision and no bytes`, async () => {
      const before = await counts();
      const url = new URL(BASE_URL);
      const socket = net.connect(Number(url.port), url.hostname === "localhost" ? "127.0.0.1" : url.hostname);
      await new Promise<void>((resolve, reject) => socket.once("connect", resolve).once("error", reject));
      const head = [
        `POST /api/programs/${programId}/revisions HTTP/1.1`,
        `Host: ${url.host}`,
        `Cookie: ${cookie}`,
        "Content-Type: text/plain",
        mode === "content-length" ? "Content-Length: 20000000" : "Transfer-Encoding: chunked",
        "",
        "",
      ].join("\r\n");
      socket.write(head);
      const piece = Buffer.from("G1 X10.5 Y20.25 F600\n".repeat(50_000));
      for (let i = 0; i < 2; i++) {
        socket.write(mode === "chunked" ? Buffer.concat([Buffer.from(`${piece.length.toString(16)}\r\n`), piece, Buffer.from("\r\n")]) : piece);
      }
      await new Promise((r) => setTimeout(r, 300));
      socket.destroy();
      // Give the server time to notice and (wrongly) store anything.
      await new Promise((r) => setTimeout(r, 1_500));
      expect(await counts()).toEqual(before);
      // The app is still fine.
      expect((await fetch(appUrl("/api/health"))).status).toBe(200);
    });
  }
});

describe("API token with curl", () => {
  it("pushes a revision with curl and a Bearer token; the revoked token gets 401", async () => {
    const created = await api("/api/tokens", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ name: "curl test" }) });
    expect(created.status).toBe(201);
    const { token } = (await created.json()) as { token: { id: number; token: string } };
    const file = path.join(dir, "part.nc");
    const text = "%\nO4711 (PUSHED BY CURL)\nG90 G21 G17\nT1 M6 (D6 END MILL)\nG54 G0 X0 Y0 S3000 M3\nG43 H1 Z10\nG1 Z-1 F100\nG1 X10 F300\nG0 Z10\nM30\n%\n";
    await writeFile(file, text);
    const query = `program=O4711&machine=${encodeURIComponent(machineName)}&part=E2E-CURL`;
    const curl = (tok: string) =>
      new Promise<{ status: number; body: string }>((resolve, reject) => {
        const child = spawn("curl", ["-sS", "-o", "-", "-w", "\n%{http_code}", "-H", `Authorization: Bearer ${tok}`, "--data-binary", `@${file}`, appUrl(`/api/revisions?${query}`)]);
        let out = "";
        child.stdout.on("data", (d: Buffer) => (out += d.toString()));
        child.on("error", reject);
        child.on("close", () => {
          const cut = out.lastIndexOf("\n");
          resolve({ status: Number(out.slice(cut + 1)), body: out.slice(0, cut) });
        });
      });
    const pushed = await curl(token.token);
    expect(pushed.status).toBe(201);
    const body = JSON.parse(pushed.body) as { revision: { sha256: string; number: number; uploadedBy: { name: string } } };
    expect(body.revision.sha256).toBe(sha256(text));
    expect(body.revision.uploadedBy.name).toBe("Ines Marchetti");
    expect((await api(`/api/tokens/${token.id}`, { method: "DELETE" })).status).toBe(200);
    const refused = await curl(token.token);
    expect(refused.status).toBe(401);
    expect(JSON.parse(refused.body)).toEqual({ error: "Sign in first." });
  });
});
