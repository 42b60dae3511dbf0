import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { listRuns } from "@/lib/dal/runs";
import { readQuery } from "@/lib/http-query";
import { route } from "@/lib/http";
import { runListSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

/** ?machine= program= programId= operator= from= to= page= pageSize= */
export const GET = route(async (req) => {
  await authorize("readRuns");
  return NextResponse.json(await listRuns(readQuery(req, runListSchema)));
});
