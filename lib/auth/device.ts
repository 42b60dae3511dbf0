import "server-only";
import { createHash, randomUUID } from "node:crypto";
import { cookies } from "next/headers";
import { sealData, unsealData } from "iron-session";
import { env } from "@/lib/env";

/**
 * The device cookie (OWASP, "Slow Down Online Guessing Attacks with Device Cookies"): a browser in
 * which an account signed in successfully is trusted for that account. A trusted browser has its
 * own tight sign-in limit and is not held back by the limits that failures from elsewhere run up,
 * so an attacker cannot lock the operator out of the shop tablet. One browser may be trusted for
 * several accounts (a shared tablet). The cookie is sealed with the session secret, so it cannot be
 * forged. The trust is tied to the password the browser proved: once the password changes (the user
 * changes it, or an admin resets it), no browser is trusted with the old one, so a browser that once
 * held a stolen password is trusted no longer after a reset.
 */
export const DEVICE_COOKIE = "cg_device";
/** How long a browser stays trusted for an account after its last successful sign-in there. */
export const TRUSTED_DEVICE_SECONDS = 60 * 24 * 60 * 60;
/** Accounts one browser is trusted for at most; the least recently used drops out. */
const MAX_ACCOUNTS = 12;

interface DeviceSeal {
  kind: "device";
  /** Random id of this browser; the trusted sign-in limit is counted per account and id. */
  id: string;
  /** User id -> [seconds since the epoch of the last successful sign-in, a fingerprint of the password hash then]. */
  users: Record<string, [number, string]>;
}

async function readDevice(): Promise<DeviceSeal | null> {
  const raw = (await cookies()).get(DEVICE_COOKIE)?.value;
  if (!raw) return null;
  try {
    const data = await unsealData<Partial<DeviceSeal>>(raw, { password: env().sessionSecret, ttl: TRUSTED_DEVICE_SECONDS });
    if (data.kind !== "device" || typeof data.id !== "string" || typeof data.users !== "object" || data.users === null) return null;
    return data as DeviceSeal;
  } catch {
    return null;
  }
}

/** Whose password a trust entry was earned with: changes whenever the stored hash does. */
const fingerprint = (passwordHash: string) => createHash("sha256").update(passwordHash).digest("base64url").slice(0, 16);

/** This browser's device id when it is trusted for `user` (signed in there lately, with the current password), else null. */
export async function trustedDeviceId(user: { id: number; passwordHash: string } | undefined): Promise<string | null> {
  if (!user) return null;
  const device = await readDevice();
  const entry = device?.users[String(user.id)];
  if (!device || !Array.isArray(entry)) return null;
  const [at, print] = entry;
  const fresh = Date.now() / 1000 - at < TRUSTED_DEVICE_SECONDS;
  return fresh && print === fingerprint(user.passwordHash) ? device.id : null;
}

/** After a successful sign-in (or a password change): trust this browser for `user` with this password. */
export async function rememberDevice(user: { id: number; passwordHash: string }): Promise<void> {
  const device = (await readDevice()) ?? { kind: "device" as const, id: randomUUID(), users: {} };
  const now = Math.floor(Date.now() / 1000);
  const entries = Object.entries(device.users).filter(([uid, [at]]) => uid !== String(user.id) && now - at < TRUSTED_DEVICE_SECONDS);
  entries.sort((a, b) => b[1][0] - a[1][0]);
  const users = Object.fromEntries([[String(user.id), [now, fingerprint(user.passwordHash)] as [number, string]], ...entries.slice(0, MAX_ACCOUNTS - 1)]);
  const seal = await sealData({ kind: "device", id: device.id, users } satisfies DeviceSeal, {
    password: env().sessionSecret,
    ttl: TRUSTED_DEVICE_SECONDS,
  });
  (await cookies()).set(DEVICE_COOKIE, seal, {
    httpOnly: true,
    sameSite: "lax",
    secure: env().cookieSecure,
    path: "/",
    maxAge: TRUSTED_DEVICE_SECONDS,
  });
}
