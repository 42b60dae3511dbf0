import { describe, expect, it } from "vitest";
import { appUrl, DEMO_PASSWORD, DEMO_USERS } from "./browser";

/** The real server over HTTP: what a script or a shop's other tools would see. */
async function post(path: string, body: unknown, headers: Record<string, string> = {}) {
  return fetch(appUrl(path), {
    method: "POST",
    headers: { "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
    redirect: "manual",
  });
}

describe("JSON API over HTTP", () => {
  it("GET /api/health is 200 with the database up", async () => {
    const res = await fetch(appUrl("/api/health"));
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ ok: true, db: "up" });
  });

  for (const { email, role } of DEMO_USERS) {
    it(`POST /api/session signs in ${email}; the cookie then reads /api/session; DELETE ends it`, async () => {
      const res = await post("/api/session", { email, password: DEMO_PASSWORD });
      expect(res.status).toBe(200);
      const body = (await res.json()) as { user: { email: string; role: string; name: string } };
      expect(body.user).toMatchObject({ email, role });
      const setCookie = res.headers.get("set-cookie") ?? "";
      const cookie = setCookie.split(";")[0]!;
      expect(cookie.startsWith("cg_session=")).toBe(true);
      // Flags as the browser receives them; plain http on localhost, so no Secure.
      expect(setCookie).toMatch(/;\s*HttpOnly/i);
      expect(setCookie).toMatch(/;\s*SameSite=lax/i);
      expect(setCookie).toMatch(/;\s*Path=\//);
      expect(setCookie).toMatch(/;\s*Max-Age=259200/);
      expect(setCookie).not.toMatch(/;\s*Secure/i);

      const me = await fetch(appUrl("/api/session"), { headers: { cookie } });
      expect(me.status).toBe(200);
      const out = await fetch(appUrl("/api/session"), { method: "DELETE", headers: { cookie } });
      expect(out.status).toBe(200);
      const after = await fetch(appUrl("/api/session"), { headers: { cookie } });
      expect(after.status).toBe(401);
      expect(await after.json()).toEqual({ error: "Sign in first." });
    });
  }

  it("signed-out API calls get 401 JSON and the wrong role 403 JSON, not a redirect", async () => {
    const anon = await fetch(appUrl("/api/users"), { redirect: "manual" });
    expect(anon.status).toBe(401);
    expect(anon.headers.get("content-type")).toMatch(/application\/json/);
    const signIn = await post("/api/session", { email: "operator@cyclegate.test", password: DEMO_PASSWORD });
    const cookie = (signIn.headers.get("set-cookie") ?? "").split(";")[0]!;
    const op = await fetch(appUrl("/api/users"), { headers: { cookie } });
    expect(op.status).toBe(403);
    expect(await op.json()).toEqual({ error: "Your role does not allow this." });
  });

  it("a signed-out page request is redirected to sign-in with the way back", async () => {
    const res = await fetch(appUrl("/audit?page=2"), { redirect: "manual" });
    expect([307, 308]).toContain(res.status);
    expect(res.headers.get("location")).toContain("/sign-in?next=%2Faudit%3Fpage%3D2");
  });

  it("a bad body is a JSON error without a stack trace", async () => {
    const res = await fetch(appUrl("/api/session"), { method: "POST", headers: { "content-type": "application/json" }, body: "{oops" });
    expect(res.status).toBe(400);
    const text = await res.text();
    expect(JSON.parse(text)).toEqual({ error: "The body is not valid JSON." });
  });

  it("a forged X-Forwarded-For does not change the address that is throttled and audited", async () => {
    const email = `forged-${Date.now()}@cyclegate.test`;
    const res = await post("/api/session", { email, password: "wrong" }, { "x-forwarded-for": "203.0.113.9", "x-real-ip": "203.0.113.9" });
    expect(res.status).toBe(401);
    const admin = await post("/api/session", { email: "admin@cyclegate.test", password: DEMO_PASSWORD });
    const cookie = (admin.headers.get("set-cookie") ?? "").split(";")[0]!;
    const audit = await fetch(appUrl("/api/audit?action=session.sign-in-failed"), { headers: { cookie } });
    const { rows } = (await audit.json()) as { rows: { details: { email?: string }; ip: string | null }[] };
    const mine = rows.find((r) => r.details.email === email);
    expect(mine).toBeDefined();
    expect(mine!.ip).not.toBe("203.0.113.9");
    expect(["127.0.0.1", "::1"]).toContain(mine!.ip);
  });
});
