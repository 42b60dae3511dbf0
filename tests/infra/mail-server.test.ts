import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import nodemailer from "nodemailer";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { startMailServer, type RunningMailServer } from "../../scripts/mail-server";

describe("local mail server", () => {
  let dir: string;
  let server: RunningMailServer;

  beforeEach(async () => {
    dir = await mkdtemp(join(tmpdir(), "cyclegate-mail-"));
    server = await startMailServer({ dir, port: 0 });
  });

  afterEach(async () => {
    await server.close();
    await rm(dir, { recursive: true, force: true });
  });

  function transport(auth?: { user: string; pass: string }) {
    return nodemailer.createTransport({ host: server.host, port: server.port, secure: false, ignoreTLS: true, auth });
  }

  it("listens on loopback on the port it picked", () => {
    expect(server.host).toBe("127.0.0.1");
    expect(server.port).toBeGreaterThan(0);
  });

  it("stores a message sent with nodemailer as one .eml file with its envelope", async () => {
    const info = await transport().sendMail({
      from: "vault@cyclegate.test",
      to: "lead@cyclegate.test",
      bcc: "audit@cyclegate.test",
      subject: "Revision 3 of bracket-op20 is waiting for release",
      text: "Please review revision 3.",
    });
    expect(info.accepted).toEqual(["lead@cyclegate.test", "audit@cyclegate.test"]);

    const files = (await readdir(dir)).filter((f) => f.endsWith(".eml"));
    expect(files).toHaveLength(1);
    const raw = await readFile(join(dir, files[0]!), "utf8");
    expect(raw).toMatch(/^X-Envelope-From: <vault@cyclegate\.test>\r\n/);
    expect(raw).toContain("X-Envelope-To: lead@cyclegate.test, audit@cyclegate.test\r\n");
    expect(raw).toContain("Subject: Revision 3 of bracket-op20 is waiting for release");
    expect(raw).toContain("Please review revision 3.");
    // Bcc must not leak into the message headers; only the envelope knows it.
    expect(raw).not.toMatch(/^Bcc:/m);
  });

  it("keeps every message in a file of its own and leaves no partial files", async () => {
    const t = transport({ user: "app", pass: "anything" });
    for (const n of [1, 2, 3]) {
      await t.sendMail({ from: "vault@cyclegate.test", to: "operator@cyclegate.test", subject: `Notice ${n}`, text: `body ${n}` });
    }
    const names = await readdir(dir);
    expect(names.filter((f) => f.endsWith(".part"))).toEqual([]);
    const bodies = await Promise.all(names.map((f) => readFile(join(dir, f), "utf8")));
    expect(bodies.map((b) => /Subject: (Notice \d)/.exec(b)?.[1]).sort()).toEqual(["Notice 1", "Notice 2", "Notice 3"]);
  });
});
