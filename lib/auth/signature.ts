import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { users } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "./errors";
import { verifyPassword } from "./password";
import { requestIp, type CurrentUser } from "./session";
import { clearSignInFailures, recordSignInFailure, signInRetryAfter } from "./throttle";

/**
 * Re-asks the signed-in user's own password for an electronic signature. Counted on the sign-in throttle of the
 * account (a wrong password here is a failed sign-in; 429 while blocked) and audited. Throws 422 with a field
 * error on a wrong password; returns on success.
 */
export async function checkSignerPassword(user: CurrentUser, password: string, purpose: string): Promise<void> {
  const ip = await requestIp();
  const wait = await signInRetryAfter(user.email, ip);
  if (wait > 0) {
    throw new RequestError(429, `Too many wrong passwords. Try again in ${wait} s.`, undefined, { "Retry-After": String(wait) });
  }
  const [row] = await db().select({ hash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  const ok = row ? await verifyPassword(row.hash, password) : false;
  if (!ok) {
    await recordSignInFailure(user.email, ip);
    await recordEvent({ actor: user, action: "signature.password-failed", objectType: "user", objectId: user.id, details: { purpose }, ip });
    throw new RequestError(422, "The password is wrong.", { fieldErrors: { password: ["The password is wrong."] } });
  }
  await clearSignInFailures(user.email);
}
