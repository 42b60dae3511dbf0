import "server-only";
import { asc, eq } from "drizzle-orm";
import { db } from "@/db";
import { revisions, signatures } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import type { SignatureView } from "@/lib/dal/revisions";

/** A signature with the revision it was given on, for a program's status history. */
export interface ProgramSignature extends SignatureView {
  revision: { id: number; number: number };
}

/** Every signature given on any revision of a program (submitted, released, rejected, waived), oldest first. */
export async function listProgramSignatures(programId: number): Promise<ProgramSignature[]> {
  await authorize("readPrograms");
  const rows = await db()
    .select({
      id: signatures.id,
      meaning: signatures.meaning,
      signerId: signatures.signerId,
      signerName: signatures.signerName,
      signerEmail: signatures.signerEmail,
      comment: signatures.comment,
      sha256: signatures.sha256,
      finding: signatures.finding,
      signedAt: signatures.signedAt,
      revisionId: revisions.id,
      revisionNumber: revisions.number,
    })
    .from(signatures)
    .innerJoin(revisions, eq(revisions.id, signatures.revisionId))
    .where(eq(revisions.programId, programId))
    .orderBy(asc(signatures.signedAt), asc(signatures.id));
  return rows.map((s) => ({
    id: s.id,
    meaning: s.meaning,
    signer: { id: s.signerId, name: s.signerName, email: s.signerEmail },
    comment: s.comment,
    sha256: s.sha256,
    finding: (s.finding as SignatureView["finding"]) ?? null,
    signedAt: s.signedAt.toISOString(),
    revision: { id: s.revisionId, number: s.revisionNumber },
  }));
}
