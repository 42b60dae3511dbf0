import "server-only";
import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { users, type Role } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { burnPasswordCheck, verifyPassword } from "./password";
import { endSession, requestIp, startSession } from "./session";
import { clearSignInFailures, recordSignInFailure, signInRetryAfter } from "./throttle";

export type SignInResult =
  | { ok: true; user: { email: string; name: string; role: Role } }
  | { ok: false; status: 401; message: string }
  | { ok: false; status: 429; message: string; retryAfter: number };

const BAD_CREDENTIALS = "The e-mail or the password is wrong.";

/**
 * Checks the credentials and starts a session. An unknown e-mail, a disabled account and a wrong
 * password answer alike; a throttled account or address is refused before the password is looked at.
 */
export async function signIn(emailRaw: string, password: string): Promise<SignInResult> {
  const email = emailRaw.trim().toLowerCase();
  const ip = await requestIp();
  const retryAfter = await signInRetryAfter(email, ip);
  if (retryAfter > 0) {
    await recordEvent({ actor: null, action: "session.sign-in-throttled", objectType: "user", details: { email, retryAfter }, ip });
    return { ok: false, status: 429, message: `Too many failed sign-ins. Try again in ${retryAfter} s.`, retryAfter };
  }
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
  const passwordOk = user ? await verifyPassword(user.passwordHash, password) : (await burnPasswordCheck(password), false);
  if (!user || !passwordOk || user.disabled) {
    await recordSignInFailure(email, ip);
    await recordEvent({
      actor: user ? { id: user.id, email: user.email } : null,
      action: "session.sign-in-failed",
      objectType: "user",
      objectId: user?.id,
      details: { email, reason: !user ? "unknown-email" : user.disabled && passwordOk ? "disabled" : "wrong-password" },
      ip,
    });
    return { ok: false, status: 401, message: BAD_CREDENTIALS };
  }
  await clearSignInFailures(email);
  await startSession(user);
  await recordEvent({ actor: user, action: "session.sign-in", objectType: "user", objectId: user.id, ip });
  return { ok: true, user: { email: user.email, name: user.name, role: user.role } };
}

export async function signOut(): Promise<boolean> {
  const ip = await requestIp();
  const user = await endSession();
  if (user) await recordEvent({ actor: user, action: "session.sign-out", objectType: "user", objectId: user.id, ip });
  return user !== null;
}
