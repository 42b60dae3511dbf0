import "server-only";
import { createHash } from "node:crypto";
import { sql } from "drizzle-orm";
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { db, pool } from "@/db";

/**
 * How many password checks are allowed, and from where (DEVELOPERS.md, "Sign-in and sessions").
 * Each limit is a fixed window that starts with its first attempt. Every attempt takes its points
 * before the password is looked at; a correct password gives them back.
 */
export const SIGN_IN_LIMITS = {
  /** One account from one place: a browser trusted for the account, or else one address. */
  pair: { points: 5, seconds: 15 * 60 },
  /** One account, from every browser it is not trusted in, all addresses together. */
  account: { points: 20, seconds: 24 * 60 * 60 },
  /** One address, over every account, for callers not trusted for the account they try. */
  address: { points: 50, seconds: 15 * 60 },
} as const;

type LimitName = keyof typeof SIGN_IN_LIMITS;

/** Who is trying which account, as the throttle sees it. */
export interface PasswordAttempt {
  /** The account as typed, normalised (lower-case e-mail), whether or not it exists. */
  account: string;
  /** The caller's address, or null when unknown. */
  ip: string | null;
  /** This browser's device id when it is trusted for the account (lib/auth/device.ts), else null. */
  trustedDevice: string | null;
}

/** The 429 message for signing in and re-entering a password alike. */
export const tooManyTries = (retryAfter: number) => `Too many failed tries. Try again in ${retryAfter} s.`;

export type ThrottledCheck = { status: "ok" } | { status: "wrong" } | { status: "throttled"; retryAfter: number };

const g = globalThis as unknown as { cyclegateLimiters?: Record<LimitName, RateLimiterPostgres> };

function limiters(): Record<LimitName, RateLimiterPostgres> {
  if (!g.cyclegateLimiters) {
    const common = { storeClient: pool(), storeType: "pool", tableName: "rate_limits", tableCreated: true } as const;
    const make = (name: LimitName) =>
      new RateLimiterPostgres({ ...common, keyPrefix: `signin-${name}`, points: SIGN_IN_LIMITS[name].points, duration: SIGN_IN_LIMITS[name].seconds });
    g.cyclegateLimiters = { pair: make("pair"), account: make("account"), address: make("address") };
  }
  return g.cyclegateLimiters;
}

/** The account part of a key: a fixed-length digest, so no e-mail can overflow the key column. */
const accountKey = (account: string) => createHash("sha256").update(account.trim().toLowerCase()).digest("hex").slice(0, 32);

/** The limits an attempt counts on, in the order they are taken: the wider ones first, so a refused address adds nothing more. */
function keysFor(a: PasswordAttempt): [LimitName, string][] {
  const acct = accountKey(a.account);
  if (a.trustedDevice) return [["pair", `${acct}:device:${a.trustedDevice}`]];
  const ip = a.ip ?? "unknown";
  return [
    ["address", ip],
    ["pair", `${acct}:ip:${ip}`],
    ["account", acct],
  ];
}

async function take(name: LimitName, key: string): Promise<RateLimiterRes> {
  try {
    return await limiters()[name].consume(key);
  } catch (e) {
    // consume() rejects with an Error when the store fails, and with the RateLimiterRes itself when
    // the limit is passed. Not `instanceof RateLimiterRes`: the limiters are shared on globalThis, and a
    // class from another bundle of the package (actions and route handlers are bundled apart) fails it.
    if (e instanceof Error) throw e;
    return e as RateLimiterRes;
  }
}

/**
 * Runs `check` (a password verification) under the sign-in limits. Points are taken first, each with
 * one atomic upsert, so however many attempts arrive at once, no more than the limit reach `check`;
 * an attempt over any limit is refused without it. A correct password clears its pair and gives the
 * account and address points back, so successes never count as failures.
 */
export async function throttledPasswordCheck(attempt: PasswordAttempt, check: () => Promise<boolean>): Promise<ThrottledCheck> {
  const keys = keysFor(attempt);
  for (const [name, key] of keys) {
    const res = await take(name, key);
    if (res.consumedPoints > SIGN_IN_LIMITS[name].points) {
      return { status: "throttled", retryAfter: Math.max(1, Math.ceil(res.msBeforeNext / 1000)) };
    }
  }
  if (!(await check())) return { status: "wrong" };
  const l = limiters();
  await Promise.all(keys.map(([name, key]) => (name === "pair" ? l.pair.delete(key) : l[name].reward(key, 1))));
  return { status: "ok" };
}

/** Lifts every sign-in limit on one account (an admin reset its password): its pairs and the untrusted-caller limit. */
export async function clearAccountLimits(account: string): Promise<void> {
  const acct = accountKey(account);
  await db().execute(
    sql`delete from rate_limits where key = ${`signin-account:${acct}`} or starts_with(key, ${`signin-pair:${acct}:`})`,
  );
}
