import "server-only";
import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { users, type Role } from "@/db/schema";
import { recordEvent, recordRepeatedEvent } from "@/lib/audit";
import { rememberDevice, trustedDeviceId } from "./device";
import { burnPasswordCheck, verifyPassword } from "./password";
import { endSession, requestIp, startSession } from "./session";
import { throttledPasswordCheck, tooManyTries } from "./throttle";

export type SignInResult =
  | { ok: true; user: { email: string; name: string; role: Role } }
  | { ok: false; status: 401; message: string }
  | { ok: false; status: 429; message: string; retryAfter: number };

const BAD_CREDENTIALS = "The e-mail or the password is wrong.";

/**
 * Checks the credentials under the sign-in limits and starts a session. An unknown e-mail, a
 * disabled account and a wrong password answer alike and cost the same; a throttled attempt is
 * refused before any password is checked. A success trusts this browser for the account.
 */
export async function signIn(emailRaw: string, password: string): Promise<SignInResult> {
  const email = emailRaw.trim().toLowerCase();
  const ip = await requestIp();
  const [user] = await db()
    .select({
      id: users.id,
      email: users.email,
      name: users.displayName,
      role: users.role,
      passwordHash: users.passwordHash,
      disabled: users.disabled,
      sessionVersion: users.sessionVersion,
    })
    .from(users)
    .where(eq(sql`lower(${users.email})`, email))
    .limit(1);
  const trustedDevice = await trustedDeviceId(user);
  let passwordOk = false;
  const outcome = await throttledPasswordCheck({ account: email, ip, trustedDevice }, async () => {
    passwordOk = user ? await verifyPassword(user.passwordHash, password) : (await burnPasswordCheck(password), false);
    return passwordOk && !user!.disabled;
  });
  if (outcome.status === "throttled") {
    await recordRepeatedEvent({
      key: `session.sign-in-throttled|${ip ?? "unknown"}`,
      actor: null,
      action: "session.sign-in-throttled",
      objectType: "user",
      details: { email, retryAfter: outcome.retryAfter },
      sample: { name: "emails", value: email },
      ip,
    });
    return { ok: false, status: 429, message: tooManyTries(outcome.retryAfter), retryAfter: outcome.retryAfter };
  }
  if (outcome.status === "wrong" || !user) {
    await recordEvent({
      actor: user ? { id: user.id, email: user.email } : null,
      action: "session.sign-in-failed",
      objectType: "user",
      objectId: user?.id,
      details: {
        email,
        reason: !user ? "unknown-email" : user.disabled && passwordOk ? "disabled" : "wrong-password",
        ...(trustedDevice && { trustedDevice: true }),
      },
      ip,
    });
    return { ok: false, status: 401, message: BAD_CREDENTIALS };
  }
  await startSession(user);
  await rememberDevice(user);
  await recordEvent({ actor: user, action: "session.sign-in", objectType: "user", objectId: user.id, ip });
  return { ok: true, user: { email: user.email, name: user.name, role: user.role } };
}

export async function signOut(): Promise<boolean> {
  const ip = await requestIp();
  const user = await endSession();
  if (user) await recordEvent({ actor: user, action: "session.sign-out", objectType: "user", objectId: user.id, ip });
  return user !== null;
}
