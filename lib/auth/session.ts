import "server-only";
import { cache } from "react";
import { cookies, headers } from "next/headers";
import { sealData, unsealData } from "iron-session";
import { and, eq, gt, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { sessions, users, type Role } from "@/db/schema";
import { env } from "@/lib/env";
import { recordRepeatedEvent } from "@/lib/audit";
import { apiBearerToken } from "./api-context";
import { AuthError } from "./errors";
import { can, type Permission } from "./roles";
import { userForToken } from "./tokens";

export const SESSION_COOKIE = "cg_session";
/** Signed out after this much inactivity. */
export const IDLE_TIMEOUT_SECONDS = 12 * 60 * 60;
/** Signed out this long after sign-in, active or not. */
export const ABSOLUTE_LIFETIME_SECONDS = 3 * 24 * 60 * 60;
/** last_seen_at is written at most this often. */
const TOUCH_INTERVAL_SECONDS = 60;

interface SealedSession {
  sid: string;
  uid: number;
  ver: number;
}

export interface CurrentUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  /** The session row's id, or "token:<id>" when the caller sent an API token. */
  sessionId: string;
  /** How the caller proved who they are. */
  via: "session" | "token";
}

export function cookieOptions() {
  return {
    httpOnly: true,
    sameSite: "lax" as const,
    secure: env().cookieSecure,
    path: "/",
    maxAge: ABSOLUTE_LIFETIME_SECONDS,
  };
}

/** The caller's address: the last X-Forwarded-For hop is the one the Next server itself appended. */
export async function requestIp(): Promise<string | null> {
  const h = await headers();
  const forwarded = h.get("x-forwarded-for");
  const last = forwarded?.split(",").pop()?.trim();
  const candidate = last || h.get("x-real-ip") || null;
  if (!candidate) return null;
  const ip = candidate.replace(/^::ffff:/, "");
  return /^[0-9a-fA-F:.]+$/.test(ip) ? ip : null;
}

/** Starts a new server-side session and sets its sealed cookie. */
export async function startSession(user: { id: number; sessionVersion: number }): Promise<string> {
  const h = await headers();
  const [row] = await db()
    .insert(sessions)
    .values({
      userId: user.id,
      sessionVersion: user.sessionVersion,
      expiresAt: new Date(Date.now() + ABSOLUTE_LIFETIME_SECONDS * 1000),
      ip: await requestIp(),
      userAgent: h.get("user-agent")?.slice(0, 300) ?? null,
    })
    .returning({ id: sessions.id });
  if (!row) throw new Error("session insert returned nothing");
  const seal = await sealData({ sid: row.id, uid: user.id, ver: user.sessionVersion } satisfies SealedSession, {
    password: env().sessionSecret,
    ttl: ABSOLUTE_LIFETIME_SECONDS,
  });
  (await cookies()).set(SESSION_COOKIE, seal, cookieOptions());
  return row.id;
}

async function readSeal(): Promise<SealedSession | null> {
  const raw = (await cookies()).get(SESSION_COOKIE)?.value;
  if (!raw) return null;
  try {
    const data = await unsealData<Partial<SealedSession>>(raw, {
      password: env().sessionSecret,
      ttl: ABSOLUTE_LIFETIME_SECONDS,
    });
    if (typeof data.sid !== "string" || typeof data.uid !== "number" || typeof data.ver !== "number") return null;
    return data as SealedSession;
  } catch {
    return null;
  }
}

/**
 * The signed-in user, checked against the database on every request: the session row must be live
 * (not revoked, not idle for 12 h, not past its lifetime) and the user enabled with the same session version.
 * Inside a JSON route handler an `Authorization: Bearer` API token is accepted instead (and wins over a cookie);
 * an unknown or revoked token means signed out.
 */
export const getCurrentUser = cache(async (): Promise<CurrentUser | null> => {
  const bearer = apiBearerToken();
  if (bearer !== null) {
    const u = await userForToken(bearer, await requestIp());
    return u ? { id: u.id, email: u.email, name: u.name, role: u.role, sessionId: `token:${u.tokenId}`, via: "token" } : null;
  }
  const seal = await readSeal();
  if (!seal) return null;
  const idleCutoff = new Date(Date.now() - IDLE_TIMEOUT_SECONDS * 1000);
  const [row] = await db()
    .select({
      id: users.id,
      email: users.email,
      name: users.displayName,
      role: users.role,
      lastSeenAt: sessions.lastSeenAt,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(
      and(
        eq(sessions.id, seal.sid),
        eq(sessions.userId, seal.uid),
        eq(sessions.sessionVersion, seal.ver),
        eq(users.sessionVersion, seal.ver),
        eq(users.disabled, false),
        isNull(sessions.revokedAt),
        gt(sessions.expiresAt, sql`now()`),
        gt(sessions.lastSeenAt, idleCutoff),
      ),
    )
    .limit(1);
  if (!row) return null;
  if (Date.now() - row.lastSeenAt.getTime() > TOUCH_INTERVAL_SECONDS * 1000) {
    await db().update(sessions).set({ lastSeenAt: sql`now()` }).where(eq(sessions.id, seal.sid));
  }
  return { id: row.id, email: row.email, name: row.name, role: row.role, sessionId: seal.sid, via: "session" };
});

/** Revokes the caller's session row and clears the cookie. */
export async function endSession(): Promise<CurrentUser | null> {
  const user = await getCurrentUser();
  const seal = await readSeal();
  if (seal) {
    await db().update(sessions).set({ revokedAt: sql`now()` }).where(eq(sessions.id, seal.sid));
  }
  (await cookies()).delete(SESSION_COOKIE);
  return user;
}

/** The signed-in user, or AuthError 401. */
export async function requireUser(): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) throw new AuthError(401);
  return user;
}

/** The signed-in user holding `permission`, or AuthError 401/403. */
export async function authorize(permission: Permission): Promise<CurrentUser> {
  const user = await requireUser();
  if (!can(user.role, permission)) {
    await recordRefusal(user, permission);
    throw new AuthError(403);
  }
  return user;
}

/** Audits a refusal for the wrong role; repeats by the same user for the same permission are rolled up. */
export async function recordRefusal(user: CurrentUser, permission: Permission): Promise<void> {
  const details = { permission, role: user.role };
  await recordRepeatedEvent({
    key: `access.refused|${user.id}|${permission}`,
    actor: user,
    action: "access.refused",
    details,
    summary: details,
    ip: await requestIp(),
  });
}
