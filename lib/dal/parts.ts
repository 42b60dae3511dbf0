import "server-only";
import { asc, eq, ilike, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { parts, programs } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp } from "@/lib/auth/session";
import { isUniqueViolation } from "@/lib/db-errors";
import { likeEscape } from "@/lib/dal/sql";
import type { PartInput } from "@/lib/vault-validation";

export interface PartView {
  id: number;
  number: string;
  name: string;
  customer: string;
  material: string;
  notes: string;
  programCount: number;
}

const columns = {
  id: parts.id,
  number: parts.number,
  name: parts.name,
  customer: parts.customer,
  material: parts.material,
  notes: parts.notes,
  programCount: sql<number>`(select count(*)::int from ${programs} where ${programs.partId} = ${parts.id})`,
};

/** Parts by number; `q` matches number, name or customer (substring, any case). At most 500. */
export async function listParts(q?: string): Promise<PartView[]> {
  await authorize("readPrograms");
  const like = q ? `%${likeEscape(q)}%` : null;
  return db()
    .select(columns)
    .from(parts)
    .where(like ? or(ilike(parts.number, like), ilike(parts.name, like), ilike(parts.customer, like)) : undefined)
    .orderBy(asc(parts.number))
    .limit(500);
}

export async function getPart(id: number): Promise<PartView | null> {
  await authorize("readPrograms");
  const [row] = await db().select(columns).from(parts).where(eq(parts.id, id));
  return row ?? null;
}

/** Creates a part (409 when the number exists, any case). */
export async function createPart(input: PartInput): Promise<PartView> {
  const actor = await authorize("writePrograms");
  const ip = await requestIp();
  try {
    return await db().transaction(async (tx) => {
      const [row] = await tx.insert(parts).values({ ...input, createdBy: actor.id }).returning({ id: parts.id });
      if (!row) throw new Error("insert returned nothing");
      await recordEvent({ actor, action: "part.create", objectType: "part", objectId: row.id, details: { number: input.number }, ip }, tx);
      return { ...input, id: row.id, programCount: 0 };
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw new RequestError(409, "A part with this number exists.", { fieldErrors: { number: ["A part with this number exists."] } });
    throw e;
  }
}
