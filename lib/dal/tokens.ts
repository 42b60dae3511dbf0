import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { apiTokens } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp } from "@/lib/auth/session";
import { generateToken } from "@/lib/auth/tokens";
import { iso } from "@/lib/dal/sql";

export interface TokenView {
  id: number;
  name: string;
  /** The token's first characters, to tell tokens apart. */
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

const columns = {
  id: apiTokens.id,
  name: apiTokens.name,
  prefix: apiTokens.prefix,
  createdAt: apiTokens.createdAt,
  lastUsedAt: apiTokens.lastUsedAt,
  revokedAt: apiTokens.revokedAt,
};

const toView = (r: { id: number; name: string; prefix: string; createdAt: Date; lastUsedAt: Date | null; revokedAt: Date | null }): TokenView => ({
  ...r,
  createdAt: r.createdAt.toISOString(),
  lastUsedAt: iso(r.lastUsedAt),
  revokedAt: iso(r.revokedAt),
});

/** The caller's own tokens, newest first (revoked ones included, marked). */
export async function listMyTokens(): Promise<TokenView[]> {
  const user = await authorize("manageOwnTokens");
  const rows = await db().select(columns).from(apiTokens).where(eq(apiTokens.userId, user.id)).orderBy(desc(apiTokens.createdAt), desc(apiTokens.id));
  return rows.map(toView);
}

/** Creates a token for the caller. The token itself is in the answer once and never again (only its hash is kept). */
export async function createToken(name: string): Promise<TokenView & { token: string }> {
  const user = await authorize("manageOwnTokens");
  if (user.via === "token") throw new RequestError(403, "Create tokens while signed in, not with another token.");
  const ip = await requestIp();
  const { token, tokenHash, prefix } = generateToken();
  return db().transaction(async (tx) => {
    const [row] = await tx.insert(apiTokens).values({ userId: user.id, name, tokenHash, prefix }).returning(columns);
    if (!row) throw new Error("insert returned nothing");
    await recordEvent({ actor: user, action: "token.create", objectType: "api-token", objectId: row.id, details: { name, prefix }, ip }, tx);
    return { ...toView(row), token };
  });
}

/** Revokes one of the caller's tokens (404 for anyone else's; 409 when already revoked). */
export async function revokeToken(id: number): Promise<TokenView> {
  const user = await authorize("manageOwnTokens");
  const ip = await requestIp();
  return db().transaction(async (tx) => {
    const [row] = await tx
      .update(apiTokens)
      .set({ revokedAt: sql`now()` })
      .where(and(eq(apiTokens.id, id), eq(apiTokens.userId, user.id), isNull(apiTokens.revokedAt)))
      .returning(columns);
    if (!row) {
      const [mine] = await tx.select({ id: apiTokens.id }).from(apiTokens).where(and(eq(apiTokens.id, id), eq(apiTokens.userId, user.id)));
      throw mine ? new RequestError(409, "This token is revoked already.") : new RequestError(404, "No such token.");
    }
    await recordEvent({ actor: user, action: "token.revoke", objectType: "api-token", objectId: id, details: { name: row.name, prefix: row.prefix }, ip }, tx);
    return toView(row);
  });
}
