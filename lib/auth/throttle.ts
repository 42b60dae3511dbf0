import "server-only";
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { pool } from "@/db";

/** Failures allowed per account in the window before sign-in answers 429. */
export const ACCOUNT_FAILURES = 5;
export const ACCOUNT_WINDOW_SECONDS = 15 * 60;
/** Failures allowed per address in the window (several people share a shop-floor tablet). */
export const IP_FAILURES = 50;
const FIRST_BLOCK_SECONDS = 60;
const MAX_BLOCK_SECONDS = 60 * 60;

interface Limiters {
  account: RateLimiterPostgres;
  blocks: RateLimiterPostgres;
  ip: RateLimiterPostgres;
}

const g = globalThis as unknown as { cyclegateLimiters?: Limiters };

function limiters(): Limiters {
  if (!g.cyclegateLimiters) {
    const common = { storeClient: pool(), storeType: "pool", tableName: "rate_limits", tableCreated: true } as const;
    g.cyclegateLimiters = {
      account: new RateLimiterPostgres({ ...common, keyPrefix: "signin-account", points: ACCOUNT_FAILURES, duration: ACCOUNT_WINDOW_SECONDS }),
      // Counts how often an account was blocked in the last day, so each block lasts twice the one before.
      blocks: new RateLimiterPostgres({ ...common, keyPrefix: "signin-blocks", points: 1000, duration: 24 * 60 * 60 }),
      ip: new RateLimiterPostgres({ ...common, keyPrefix: "signin-ip", points: IP_FAILURES, duration: ACCOUNT_WINDOW_SECONDS }),
    };
  }
  return g.cyclegateLimiters;
}

const accountKey = (email: string) => email.trim().toLowerCase();

/** Seconds to wait before another try, or 0 when a try is allowed now. */
export async function signInRetryAfter(email: string, ip: string | null): Promise<number> {
  const l = limiters();
  const [acct, byIp] = await Promise.all([l.account.get(accountKey(email)), ip ? l.ip.get(ip) : null]);
  const wait = (r: RateLimiterRes | null, points: number) =>
    r && r.consumedPoints >= points ? Math.max(1, Math.ceil(r.msBeforeNext / 1000)) : 0;
  return Math.max(wait(acct, ACCOUNT_FAILURES), wait(byIp, IP_FAILURES));
}

async function consume(limiter: RateLimiterPostgres, key: string): Promise<RateLimiterRes> {
  try {
    return await limiter.consume(key);
  } catch (e) {
    if (e instanceof RateLimiterRes) return e;
    throw e;
  }
}

/** Counts one failed sign-in; from the fifth failure on the account is blocked for a growing time. */
export async function recordSignInFailure(email: string, ip: string | null): Promise<void> {
  const l = limiters();
  const key = accountKey(email);
  const [acct] = await Promise.all([consume(l.account, key), ip ? consume(l.ip, ip) : null]);
  if (acct.consumedPoints >= ACCOUNT_FAILURES) {
    const n = (await consume(l.blocks, key)).consumedPoints;
    const seconds = Math.min(FIRST_BLOCK_SECONDS * 2 ** (n - 1), MAX_BLOCK_SECONDS);
    await l.account.block(key, seconds);
  }
}

export async function clearSignInFailures(email: string): Promise<void> {
  await limiters().account.delete(accountKey(email));
}
