/**
 * The sign-in throttle as an attacker meets it (issue items 2, 3 and 6): points are taken before a
 * password is checked, so parallel tries cannot slip past the limit; a wrong current password on the
 * account page counts on the same throttle and is audited; and a flood of failures from elsewhere
 * does not lock the real user out of the browser they normally sign in from.
 *
 * Every real password check is counted: the password module is wrapped so each verification (and
 * the equal-cost check spent on an unknown e-mail) adds one to `checks`.
 */
import { sql } from "drizzle-orm";
import { beforeEach, describe, expect, it, vi } from "vitest";
import { db } from "@/db";
import { auditEvents } from "@/db/schema";
import * as sessionRoute from "@/app/api/session/route";
import * as accountActions from "@/app/(app)/account/actions";
import * as userActions from "@/app/(app)/admin/users/actions";
import { initialFormState } from "@/lib/form-state";
import { signIn } from "@/lib/auth/sign-in";
import * as throttle from "@/lib/auth/throttle";
import { actAs, formData, jsonRequest, makeUser } from "./helpers";
import { requestContext, type JarCookie } from "./request-context";
import { DEVICE_COOKIE } from "@/lib/auth/device";

const checks = vi.hoisted(() => ({ n: 0 }));

vi.mock("@/lib/auth/password", async (importOriginal) => {
  const real = await importOriginal<typeof import("@/lib/auth/password")>();
  return {
    ...real,
    verifyPassword: async (hash: string, password: string) => {
      checks.n++;
      return real.verifyPassword(hash, password);
    },
    burnPasswordCheck: async (password: string) => {
      checks.n++;
      return real.burnPasswordCheck(password);
    },
  };
});

/** The policy as DEVELOPERS.md states it ("Sign-in and sessions"). */
const POLICY = {
  pair: { points: 5, seconds: 15 * 60 },
  account: { points: 20, seconds: 24 * 60 * 60 },
  address: { points: 50, seconds: 15 * 60 },
};
const SIGN_IN_LIMITS = POLICY;

const post = (email: string, password: string) =>
  sessionRoute.POST(jsonRequest("POST", { email, password }), undefined).then((r) => r.status);

/** The device cookie a successful sign-in left in this browser, to carry to a later request. */
function deviceCookie(): Map<string, JarCookie> {
  return new Map([...requestContext.jar].filter(([name]) => name === DEVICE_COOKIE));
}

beforeEach(() => {
  requestContext.reset();
  checks.n = 0;
});

describe("the throttle policy", () => {
  it("is the one DEVELOPERS.md documents", () => {
    expect((throttle as { SIGN_IN_LIMITS?: unknown }).SIGN_IN_LIMITS).toEqual(POLICY);
  });
});

describe("parallel sign-in attempts (item 2)", () => {
  it("40 wrong passwords sent at once from one address: at most 5 are verified, the rest answer 429", async () => {
    const u = await makeUser("operator");
    requestContext.reset("10.40.0.1");
    const statuses = await Promise.all(Array.from({ length: 40 }, (_, i) => post(u.email, `wrong-guess-${i}`)));
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.pair.points);
    expect(checks.n).toBeGreaterThan(0);
    expect(statuses.filter((s) => s === 401)).toHaveLength(checks.n);
    expect(statuses.filter((s) => s === 429)).toHaveLength(40 - checks.n);
    // The audit record agrees: one failed-sign-in row per verified password.
    const failed = await db()
      .select({ n: sql<number>`count(*)::int` })
      .from(auditEvents)
      .where(sql`${auditEvents.action} = 'session.sign-in-failed' and ${auditEvents.details}->>'email' = ${u.email}`);
    expect(failed[0]!.n).toBe(checks.n);
    // The right password from the same place waits too.
    expect(await post(u.email, u.password)).toBe(429);
  });

  it("40 at once from 40 addresses: no more than the account limit for untrusted callers is verified", async () => {
    const u = await makeUser("operator");
    const statuses = await Promise.all(
      Array.from({ length: 40 }, async (_, i) => {
        requestContext.reset(`10.41.${i}.1`);
        return post(u.email, `wrong-guess-${i}`);
      }),
    );
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.account.points);
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(40 - SIGN_IN_LIMITS.account.points);
  });

  it("an unknown e-mail is throttled exactly like a real one", async () => {
    requestContext.reset("10.42.0.1");
    const statuses = await Promise.all(Array.from({ length: 12 }, () => post("nobody-at-all@it.cyclegate.test", "guess")));
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.pair.points);
    expect(statuses.filter((s) => s === 401)).toHaveLength(checks.n);
    expect(statuses.filter((s) => s === 429)).toHaveLength(12 - checks.n);
  });
});

describe("lockout is no denial of service (item 6)", () => {
  it("failures from elsewhere block untrusted callers, but not the browser the user signed in from before", async () => {
    const u = await makeUser("operator");
    requestContext.reset("10.60.0.7"); // the shop tablet
    expect((await signIn(u.email, u.password)).ok).toBe(true);
    const tablet = deviceCookie();
    expect(tablet.size).toBe(1);
    checks.n = 0;

    // Someone elsewhere guesses from many addresses until untrusted callers are refused.
    let refused = 0;
    for (let i = 0; i < SIGN_IN_LIMITS.account.points + 5; i++) {
      requestContext.reset(`10.61.${i}.9`);
      if ((await post(u.email, `guess-${i}`)) === 429) refused++;
    }
    expect(refused).toBeGreaterThanOrEqual(5);
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.account.points);
    // A new place, even with the right password, waits.
    requestContext.reset("10.62.0.1");
    expect(await post(u.email, u.password)).toBe(429);

    // The operator at the tablet still gets in.
    requestContext.reset("10.60.0.7");
    requestContext.restore(tablet);
    expect(await post(u.email, u.password)).toBe(200);
  });

  it("a trusted browser has its own tight limit: guessing from it gets nowhere either", async () => {
    const u = await makeUser("operator");
    requestContext.reset("10.63.0.1");
    expect((await signIn(u.email, u.password)).ok).toBe(true);
    const device = deviceCookie();
    checks.n = 0;
    requestContext.reset("10.63.0.1");
    requestContext.restore(device);
    const statuses = await Promise.all(Array.from({ length: 20 }, (_, i) => post(u.email, `wrong-${i}`)));
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.pair.points);
    expect(statuses.filter((s) => s === 429).length).toBe(20 - checks.n);
  });

  it("an address that sprayed many accounts is refused for new callers, but its trusted users still get in", async () => {
    const u = await makeUser("operator");
    requestContext.reset("10.64.0.1");
    expect((await signIn(u.email, u.password)).ok).toBe(true);
    const device = deviceCookie();

    requestContext.reset("10.64.0.1");
    let last = 0;
    for (let i = 0; i <= SIGN_IN_LIMITS.address.points; i++) {
      last = await post(`spray-${i}-${u.id}@it.cyclegate.test`, "guess");
    }
    expect(last).toBe(429);
    expect(await post(u.email, u.password)).toBe(429); // no device cookie: an untrusted caller on a refused address

    requestContext.reset("10.64.0.1");
    requestContext.restore(device);
    expect(await post(u.email, u.password)).toBe(200);
  });

  it("an admin's password reset lifts the account limit for untrusted callers", async () => {
    const u = await makeUser("operator");
    for (let i = 0; i < SIGN_IN_LIMITS.account.points + 1; i++) {
      requestContext.reset(`10.65.${i}.3`);
      await post(u.email, `guess-${i}`);
    }
    requestContext.reset("10.65.200.3");
    expect(await post(u.email, u.password)).toBe(429);
    await actAs("admin");
    const reset = await userActions.resetPasswordAction(
      u.id,
      initialFormState,
      formData({ password: "handed-over-in-person", confirmPassword: "handed-over-in-person" }),
    );
    expect(reset.status).toBe(200);
    requestContext.reset("10.65.201.3");
    expect(await post(u.email, "handed-over-in-person")).toBe(200);
  });
});

describe("changing one's own password is no password oracle (item 3)", () => {
  const change = (current: string) =>
    accountActions.changePasswordAction(
      initialFormState,
      formData({ currentPassword: current, newPassword: "a-fine-new-password", confirmPassword: "a-fine-new-password" }),
    );

  it("wrong current passwords count on the sign-in throttle (429 with a wait) and are audited with the purpose", async () => {
    const me = await actAs("operator");
    checks.n = 0;
    const states = [];
    for (let i = 0; i < SIGN_IN_LIMITS.pair.points + 3; i++) states.push(await change(`not-mine-${i}`));
    expect(states.slice(0, SIGN_IN_LIMITS.pair.points).every((s) => s.status === 422)).toBe(true);
    expect(states.slice(SIGN_IN_LIMITS.pair.points).every((s) => s.status === 429)).toBe(true);
    expect(states.at(-1)!.message).toMatch(/Try again in \d+ s/);
    expect(checks.n).toBe(SIGN_IN_LIMITS.pair.points);
    // Even the right one waits now; the password is unchanged.
    expect((await change(me!.password)).status).toBe(429);

    const rows = await db()
      .select({ action: auditEvents.action, details: auditEvents.details })
      .from(auditEvents)
      .where(sql`${auditEvents.actorId} = ${me!.id} and ${auditEvents.action} like 'session.reauth%'`);
    const failed = rows.filter((r) => r.action === "session.reauth-failed");
    expect(failed).toHaveLength(SIGN_IN_LIMITS.pair.points);
    expect(failed.every((r) => (r.details as { purpose?: string }).purpose === "password-change")).toBe(true);
    expect(rows.filter((r) => r.action === "session.reauth-throttled").length).toBeGreaterThanOrEqual(1);
  });

  it("parallel wrong current passwords: at most 5 are verified", async () => {
    await actAs("programmer");
    checks.n = 0;
    const states = await Promise.all(Array.from({ length: 20 }, (_, i) => change(`not-mine-${i}`)));
    expect(checks.n).toBeLessThanOrEqual(SIGN_IN_LIMITS.pair.points);
    expect(states.filter((s) => s.status === 429)).toHaveLength(20 - checks.n);
  });
});
