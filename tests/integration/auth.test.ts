import { sql } from "drizzle-orm";
import { beforeEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, sessions } from "@/db/schema";
import * as sessionRoute from "@/app/api/session/route";
import * as userRoute from "@/app/api/users/[id]/route";
import * as accountActions from "@/app/(app)/account/actions";
import { initialFormState } from "@/lib/form-state";
import { loadEnv } from "@/lib/env";
import { ABSOLUTE_LIFETIME_SECONDS, cookieOptions, getCurrentUser, IDLE_TIMEOUT_SECONDS, SESSION_COOKIE } from "@/lib/auth/session";
import { SIGN_IN_LIMITS } from "@/lib/auth/throttle";
import { signIn } from "@/lib/auth/sign-in";
import { actAs, actionStatus, formData, jsonRequest, makeUser, params } from "./helpers";
import { requestContext } from "./request-context";

const whoAmI = async () => (await sessionRoute.GET(jsonRequest("GET"), undefined)).status;

beforeEach(() => requestContext.reset());

describe("session cookie", () => {
  it("is httpOnly, SameSite=Lax, path /, with the absolute lifetime, and sealed (nothing readable inside)", async () => {
    const u = await makeUser("operator");
    const res = await signIn(u.email, u.password);
    expect(res.ok).toBe(true);
    const c = requestContext.jar.get(SESSION_COOKIE);
    expect(c).toBeDefined();
    expect(c!.options).toMatchObject({ httpOnly: true, sameSite: "lax", path: "/", maxAge: ABSOLUTE_LIFETIME_SECONDS });
    expect(c!.value).not.toContain(u.email);
    // The session id and user id travel encrypted: no part of the seal, read as text or base64url, shows them.
    // (Checking the raw value for "uid" would fail now and then: base64url text can spell it by chance.)
    for (const part of c!.value.split("*")) {
      expect(part).not.toMatch(/"(sid|uid|ver)"/);
      expect(Buffer.from(part, "base64url").toString("latin1")).not.toMatch(/"(sid|uid|ver)"\s*:/);
    }
    expect(c!.value.startsWith("Fe26.2*")).toBe(true); // iron's seal format
  });

  it("is Secure unless the app is plain http on localhost or COOKIE_SECURE=false", () => {
    const base = { SESSION_SECRET: "s".repeat(32) };
    expect(loadEnv({ ...base, APP_URL: "https://shop.example.test" }).cookieSecure).toBe(true);
    expect(loadEnv({ ...base, APP_URL: "http://localhost:3000" }).cookieSecure).toBe(false);
    expect(loadEnv({ ...base, APP_URL: "http://cnc-floor.example.test" }).cookieSecure).toBe(true);
    expect(loadEnv({ ...base, APP_URL: "https://shop.example.test", COOKIE_SECURE: "false" }).cookieSecure).toBe(false);
    expect(cookieOptions().secure).toBe(false); // npm test serves plain http on localhost
  });

  it("has a 12-hour idle timeout: a session idle longer is refused", async () => {
    expect(IDLE_TIMEOUT_SECONDS).toBe(12 * 3600);
    await actAs("operator");
    expect(await whoAmI()).toBe(200);
    const user = await getCurrentUser();
    await db()
      .update(sessions)
      .set({ lastSeenAt: sql`now() - interval '12 hours 1 minute'` })
      .where(sql`${sessions.id} = ${user!.sessionId}`);
    expect(await whoAmI()).toBe(401);
  });

  it("is refused past its absolute lifetime even when active", async () => {
    await actAs("operator");
    const user = await getCurrentUser();
    await db().update(sessions).set({ expiresAt: sql`now() - interval '1 second'` }).where(sql`${sessions.id} = ${user!.sessionId}`);
    expect(await whoAmI()).toBe(401);
  });

  it("a tampered cookie is refused", async () => {
    await actAs("operator");
    const c = requestContext.jar.get(SESSION_COOKIE)!;
    requestContext.jar.set(SESSION_COOKIE, { ...c, value: c.value.slice(0, -4) + "AAAA" });
    expect(await whoAmI()).toBe(401);
  });
});

describe("old cookies stop working", () => {
  it("a cookie kept from before sign-out is refused", async () => {
    await actAs("programmer");
    const kept = requestContext.snapshot();
    expect((await sessionRoute.DELETE(jsonRequest("DELETE"), undefined)).status).toBe(200);
    expect(requestContext.jar.has(SESSION_COOKIE)).toBe(false);
    requestContext.restore(kept);
    expect(await whoAmI()).toBe(401);
  });

  it("a cookie kept from before a password change is refused, on every device", async () => {
    const me = await actAs("operator");
    const otherDevice = requestContext.snapshot();
    const status = await actionStatus(() =>
      accountActions.changePasswordAction(
        initialFormState,
        formData({ currentPassword: me!.password, newPassword: "fresh-password-123", confirmPassword: "fresh-password-123" }),
      ),
    );
    expect(status).toBe(200);
    requestContext.restore(otherDevice);
    expect(await whoAmI()).toBe(401);
    requestContext.reset();
    expect((await signIn(me!.email, me!.password)).ok).toBe(false);
    expect((await signIn(me!.email, "fresh-password-123")).ok).toBe(true);
  });

  it("a cookie of a user an admin disabled is refused, and they cannot sign in", async () => {
    const victim = await actAs("operator");
    const victimJar = requestContext.snapshot();
    expect(await whoAmI()).toBe(200);
    await actAs("admin");
    const res = await userRoute.PATCH(jsonRequest("PATCH", { disabled: true }), params({ id: String(victim!.id) }));
    expect(res.status).toBe(200);
    requestContext.restore(victimJar);
    expect(await whoAmI()).toBe(401);
    const again = await signIn(victim!.email, victim!.password);
    expect(again).toMatchObject({ ok: false, status: 401 });
  });

  it("a role change ends the user's sessions (the old cookie carried the old role)", async () => {
    const victim = await actAs("operator");
    const jar = requestContext.snapshot();
    await actAs("admin");
    await userRoute.PATCH(jsonRequest("PATCH", { role: "lead" }), params({ id: String(victim!.id) }));
    requestContext.restore(jar);
    expect(await whoAmI()).toBe(401);
  });
});

describe("sign-in", () => {
  it("POST /api/session answers 200 with the user, GET returns them, DELETE signs out", async () => {
    const u = await makeUser("lead");
    const res = await sessionRoute.POST(jsonRequest("POST", { email: u.email.toUpperCase(), password: u.password }), undefined);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ user: { email: u.email, name: "Test lead", role: "lead" } });
    const me = await sessionRoute.GET(jsonRequest("GET"), undefined);
    expect(await me.json()).toEqual({ user: { email: u.email, name: "Test lead", role: "lead" } });
  });

  it("an unknown e-mail answers exactly like a wrong password", async () => {
    const u = await makeUser("operator");
    const wrong = await sessionRoute.POST(jsonRequest("POST", { email: u.email, password: "not-it-at-all" }), undefined);
    const unknown = await sessionRoute.POST(jsonRequest("POST", { email: "nobody-here@it.cyclegate.test", password: "not-it-at-all" }), undefined);
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(await unknown.json()).toEqual(await wrong.json());
  });

  it("bad bodies get 415, 400 and 422 JSON, never a stack trace", async () => {
    const text = await sessionRoute.POST(new Request("http://localhost/api/session", { method: "POST", body: "x" }), undefined);
    expect(text.status).toBe(415);
    const broken = await sessionRoute.POST(
      new Request("http://localhost/api/session", { method: "POST", headers: { "content-type": "application/json" }, body: "{" }),
      undefined,
    );
    expect(broken.status).toBe(400);
    const shape = await sessionRoute.POST(jsonRequest("POST", { email: 3 }), undefined);
    expect(shape.status).toBe(422);
    const body = (await shape.json()) as { error: string; issues: { fieldErrors: Record<string, string[]> } };
    expect(Object.keys(body.issues.fieldErrors).sort()).toEqual(["email", "password"]);
    expect(JSON.stringify(body)).not.toMatch(/at .*\.ts:\d+/);
  });

  it("gives one account 5 tries per address in 15 minutes, then 429 with Retry-After even for the right password", async () => {
    const u = await makeUser("operator");
    const { points, seconds } = SIGN_IN_LIMITS.pair;
    requestContext.reset("10.1.0.1");
    for (let i = 0; i < points; i++) {
      const r = await sessionRoute.POST(jsonRequest("POST", { email: u.email, password: `wrong-${i}` }), undefined);
      expect(r.status).toBe(401);
    }
    const blocked = await sessionRoute.POST(jsonRequest("POST", { email: u.email, password: u.password }), undefined);
    expect(blocked.status).toBe(429);
    const wait = Number(blocked.headers.get("retry-after"));
    expect(wait).toBeGreaterThan(seconds - 60);
    expect(wait).toBeLessThanOrEqual(seconds);
    expect(((await blocked.json()) as { error: string }).error).toBe(`Too many failed tries. Try again in ${wait} s.`);

    // Another address is another pair: the right password gets in there.
    requestContext.reset("10.1.0.2");
    expect((await sessionRoute.POST(jsonRequest("POST", { email: u.email, password: u.password }), undefined)).status).toBe(200);

    const events = await db()
      .select({ action: auditEvents.action })
      .from(auditEvents)
      .where(sql`${auditEvents.details}->>'email' = ${u.email}`);
    const actions = events.map((e) => e.action);
    expect(actions.filter((a) => a === "session.sign-in-failed")).toHaveLength(points);
    expect(actions.filter((a) => a === "session.sign-in-throttled")).toHaveLength(1);
  });

  it("throttles one address that tries many accounts", async () => {
    requestContext.reset("10.250.250.250");
    let last = 0;
    for (let i = 0; i <= SIGN_IN_LIMITS.address.points; i++) {
      last = (await sessionRoute.POST(jsonRequest("POST", { email: `spray-${i}@it.cyclegate.test`, password: "guess" }), undefined)).status;
    }
    expect(last).toBe(429);
  });

  it("a correct password gives its points back: many people signing in on one tablet are never held back", async () => {
    requestContext.reset("10.251.0.1");
    for (let i = 0; i < SIGN_IN_LIMITS.address.points + 10; i++) {
      const u = await makeUser("operator");
      requestContext.reset("10.251.0.1");
      expect((await sessionRoute.POST(jsonRequest("POST", { email: u.email, password: u.password }), undefined)).status).toBe(200);
    }
  });

  it("sign-ins and sign-outs are audited with the address", async () => {
    requestContext.reset("10.77.0.5");
    const u = await makeUser("operator");
    await signIn(u.email, u.password);
    await sessionRoute.DELETE(jsonRequest("DELETE"), undefined);
    const rows = await db()
      .select({ action: auditEvents.action, ip: auditEvents.ip })
      .from(auditEvents)
      .where(sql`${auditEvents.actorId} = ${u.id}`);
    expect(rows.map((r) => r.action).sort()).toEqual(["session.sign-in", "session.sign-out"]);
    expect(rows.every((r) => r.ip === "10.77.0.5")).toBe(true);
  });

  it("a refusal for the wrong role is audited with the permission asked for", async () => {
    const op = await actAs("operator");
    const { GET } = await import("@/app/api/users/route");
    expect((await GET(jsonRequest("GET"), undefined)).status).toBe(403);
    const rows = await db()
      .select({ action: auditEvents.action, details: auditEvents.details })
      .from(auditEvents)
      .where(sql`${auditEvents.actorId} = ${op!.id} and ${auditEvents.action} = 'access.refused'`);
    expect(rows).toEqual([{ action: "access.refused", details: { permission: "manageUsers", role: "operator" } }]);
  });
});
