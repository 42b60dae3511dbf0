import "server-only";
import { createHash, randomBytes } from "node:crypto";
import { and, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { apiTokens, users, type Role } from "@/db/schema";
import { recordEvent } from "@/lib/audit";

/** Tokens look like `cgt_` + 43 base64url characters (32 random bytes). */
export const TOKEN_PREFIX = "cgt_";
const TOKEN_PATTERN = /^cgt_[A-Za-z0-9_-]{43}$/;
/** last_used_at is written at most this often per token. */
const TOUCH_INTERVAL_MS = 60_000;

export function hashToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/** A new random token and what is stored of it. */
export function generateToken(): { token: string; tokenHash: string; prefix: string } {
  const token = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  return { token, tokenHash: hashToken(token), prefix: token.slice(0, 10) };
}

export interface TokenUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  tokenId: number;
}

/**
 * The enabled user a live (not revoked) token belongs to, or null. Records the first use in the audit record and
 * the last use (at most once a minute) on the token.
 */
export async function userForToken(token: string, ip: string | null): Promise<TokenUser | null> {
  if (!TOKEN_PATTERN.test(token)) return null;
  const [row] = await db()
    .select({
      id: users.id,
      email: users.email,
      name: users.displayName,
      role: users.role,
      tokenId: apiTokens.id,
      tokenName: apiTokens.name,
      lastUsedAt: apiTokens.lastUsedAt,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.tokenHash, hashToken(token)), isNull(apiTokens.revokedAt), eq(users.disabled, false)))
    .limit(1);
  if (!row) return null;
  if (row.lastUsedAt === null) {
    await db().transaction(async (tx) => {
      const first = await tx
        .update(apiTokens)
        .set({ lastUsedAt: sql`now()` })
        .where(and(eq(apiTokens.id, row.tokenId), isNull(apiTokens.lastUsedAt)))
        .returning({ id: apiTokens.id });
      if (first.length > 0) {
        await recordEvent(
          { actor: row, action: "token.first-use", objectType: "api-token", objectId: row.tokenId, details: { name: row.tokenName }, ip },
          tx,
        );
      }
    });
  } else if (Date.now() - row.lastUsedAt.getTime() > TOUCH_INTERVAL_MS) {
    await db().update(apiTokens).set({ lastUsedAt: sql`now()` }).where(eq(apiTokens.id, row.tokenId));
  }
  return { id: row.id, email: row.email, name: row.name, role: row.role, tokenId: row.tokenId };
}
