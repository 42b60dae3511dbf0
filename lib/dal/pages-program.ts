import "server-only";
import { authorize } from "@/lib/auth/session";
import { signaturesOf, type SignatureView } from "@/lib/dal/revisions";

/** A signature with the revision it was given on, for a program's status history. */
export interface ProgramSignature extends SignatureView {
  revision: { id: number; number: number };
}

/**
 * Every signature given on the program's revisions (submitted, released, rejected, waived), oldest first. The
 * caller passes the revisions it has already read (a program has tens, not thousands).
 */
export async function listProgramSignatures(revisions: { id: number; number: number }[]): Promise<ProgramSignature[]> {
  await authorize("readPrograms");
  const lists = await Promise.all(
    revisions.map(async (r) => (await signaturesOf(r.id)).map((s) => ({ ...s, revision: { id: r.id, number: r.number } }))),
  );
  return lists.flat().sort((x, y) => x.signedAt.localeCompare(y.signedAt) || x.id - y.id);
}
