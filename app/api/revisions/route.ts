import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { findOrCreateProgram } from "@/lib/dal/programs";
import { uploadRevision } from "@/lib/dal/revisions";
import { env } from "@/lib/env";
import { route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { receiveProgram, uploadTiming } from "@/lib/upload";
import { pushQuerySchema } from "@/lib/vault-validation";

// Outside proxy.ts's matcher like every upload route (see app/api/programs/[id]/revisions/route.ts).
export const dynamic = "force-dynamic";

/**
 * A push from a CAM post-processor: `?program=O1001&machine=<id or name>[&part=FH-2207&title=...&operation=...&note=...]`.
 * Finds the program by number on that machine, or creates it (with the part, found or created by number), then
 * stores the body as its next revision exactly like POST /api/programs/{id}/revisions.
 */
export const POST = route(async (req) => {
  await authorize("writePrograms");
  const query = readQuery(req, pushQuerySchema);
  const program = await findOrCreateProgram(query);
  const t0 = performance.now();
  const file = await receiveProgram(req, env().uploadMaxBytes);
  const t1 = performance.now();
  const revision = await uploadRevision(program.id, file, { note: query.note ?? "" });
  const timing = uploadTiming(t0, t1, file);
  return NextResponse.json({ revision, programCreated: program.created }, { status: 201, headers: { "Server-Timing": timing } });
});
