import { NextResponse } from "next/server";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { programs } from "@/db/schema";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { uploadRevision } from "@/lib/dal/revisions";
import { env } from "@/lib/env";
import { parseId, route } from "@/lib/http";
import { receiveProgram, uploadTiming } from "@/lib/upload";
import { multiLine } from "@/lib/vault-validation";

// Uploads stay outside proxy.ts's matcher (it skips every `api/` path): Next buffers the body of a request the
// proxy runs on up to 10 MB and then passes it on cut short without an error, which would store a piece of a file.
export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

const noteSchema = multiLine("a note", 2000);

/**
 * Uploads a revision: the raw body (text/plain or application/octet-stream) or the multipart field `file`.
 * Headers: X-Content-SHA256 (optional, must match), X-File-Name (display label), X-Revision-Note (optional).
 */
export const POST = route<Ctx>(async (req, { params }) => {
  await authorize("writePrograms");
  const programId = parseId((await params).id);
  // Refuse before reading a byte of the body when the program does not exist.
  const [program] = await db().select({ id: programs.id }).from(programs).where(eq(programs.id, programId));
  if (!program) throw new RequestError(404, "No such program.");
  const note = noteSchema.safeParse(decodeHeader(req.headers.get("x-revision-note")) ?? "");
  if (!note.success) throw new RequestError(422, "The note is invalid.", { fieldErrors: { note: note.error.issues.map((i) => i.message) } });
  const t0 = performance.now();
  const file = await receiveProgram(req, env().uploadMaxBytes);
  const t1 = performance.now();
  const revision = await uploadRevision(programId, file, { note: note.data });
  const timing = uploadTiming(t0, t1, file);
  return NextResponse.json({ revision }, { status: 201, headers: { "Server-Timing": timing } });
});

function decodeHeader(v: string | null): string | null {
  if (v === null) return null;
  try {
    return decodeURIComponent(v);
  } catch {
    return v;
  }
}
