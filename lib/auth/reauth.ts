import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { users } from "@/db/schema";
import { recordEvent, recordRepeatedEvent } from "@/lib/audit";
import { RequestError } from "./errors";
import { trustedDeviceId } from "./device";
import { verifyPassword } from "./password";
import { requestIp } from "./session";
import { throttledPasswordCheck, tooManyTries } from "./throttle";

export type ReauthResult =
  | { ok: true }
  | { ok: false; reason: "wrong"; message: string }
  | { ok: false; reason: "throttled"; message: string; retryAfter: number };

/** Names what the password was re-entered for, in the audit record: "password-change", "revision-release"... */
const PURPOSE = /^[a-z][a-z0-9-]{0,39}$/;

/**
 * Checks the signed-in user's own password again, before something that needs it (changing the
 * password, signing a release). Counted on the same limits as a sign-in from this browser, so it
 * is no unlimited password oracle: a wrong password is audited as `session.reauth-failed` with
 * the purpose, and past the limit the answer is "throttled" with the seconds to wait (audited as
 * `session.reauth-throttled`, rolled up). The caller has already authorised `user`.
 */
export async function verifyOwnPassword(user: { id: number; email: string }, password: string, purpose: string): Promise<ReauthResult> {
  if (!PURPOSE.test(purpose)) throw new Error(`verifyOwnPassword: purpose must be a short kebab-case name, got ${JSON.stringify(purpose)}`);
  const ip = await requestIp();
  const [row] = await db().select({ id: users.id, passwordHash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  const trustedDevice = await trustedDeviceId(row);
  const outcome = await throttledPasswordCheck({ account: user.email, ip, trustedDevice }, async () =>
    row ? verifyPassword(row.passwordHash, password) : false,
  );
  if (outcome.status === "throttled") {
    await recordRepeatedEvent({
      key: `session.reauth-throttled|${user.id}|${purpose}`,
      actor: user,
      action: "session.reauth-throttled",
      objectType: "user",
      objectId: user.id,
      details: { purpose, retryAfter: outcome.retryAfter },
      summary: { purpose },
      ip,
    });
    return { ok: false, reason: "throttled", message: tooManyTries(outcome.retryAfter), retryAfter: outcome.retryAfter };
  }
  if (outcome.status === "wrong") {
    await recordEvent({ actor: user, action: "session.reauth-failed", objectType: "user", objectId: user.id, details: { purpose }, ip });
    return { ok: false, reason: "wrong", message: "The password is wrong." };
  }
  return { ok: true };
}

/**
 * verifyOwnPassword for an action or a route handler: returns when the password is right, else
 * throws what runAction and route() answer with: 422 with the message on `field` (not 401, which a
 * client would read as "signed out"), or 429 with Retry-After.
 */
export async function requireOwnPassword(user: { id: number; email: string }, password: string, purpose: string, field = "password"): Promise<void> {
  const result = await verifyOwnPassword(user, password, purpose);
  if (result.ok) return;
  if (result.reason === "throttled") {
    throw new RequestError(429, result.message, undefined, { "Retry-After": String(result.retryAfter) });
  }
  throw new RequestError(422, result.message, { formErrors: [], fieldErrors: { [field]: [result.message] } });
}
