import { Readable } from "node:stream";
import { createGzip } from "node:zlib";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { readRevisionFile } from "@/lib/dal/revisions";
import { attachmentDisposition } from "@/lib/program-file";
import { acceptsCoding, parseId, route } from "@/lib/http";
import { PRECOMPRESSED_HEADER } from "@/lib/security-headers";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/**
 * The exact bytes as uploaded, as an attachment; every download is in the audit record. `?purpose=view` is the
 * app's own code pane and 3D view reading the text: audited too, rolled up per person and revision.
 */
export const GET = route<Ctx>(async (req, { params }) => {
  await authorize("readPrograms");
  const purpose = new URL(req.url).searchParams.get("purpose") === "view" ? "view" : "download";
  const file = await readRevisionFile(parseId((await params).id), purpose);
  if (!file) throw new RequestError(404, "No such revision.");
  const bytes = new Uint8Array(file.bytes.buffer as ArrayBuffer, file.bytes.byteOffset, file.bytes.byteLength);
  // NC text shrinks to about a third gzipped: compressed on the way out (a worker-pool stream, so the app keeps
  // answering); Next drops Content-Encoding from route handlers, scripts/serve.ts sets it from PRECOMPRESSED_HEADER
  const gzip = acceptsCoding(req.headers.get("accept-encoding"), "gzip") && bytes.byteLength >= 1024;
  const body = gzip ? (Readable.toWeb(Readable.from([bytes]).pipe(createGzip({ level: 6 }))) as ReadableStream<Uint8Array>) : bytes;
  return new Response(body, {
    headers: {
      "Content-Type": "application/octet-stream",
      ...(gzip ? { [PRECOMPRESSED_HEADER]: "gzip", Vary: "Accept-Encoding" } : { "Content-Length": String(file.bytes.byteLength) }),
      "Content-Disposition": attachmentDisposition(file.fileName),
      "X-Content-SHA256": file.sha256,
      ETag: `"${file.sha256}"`,
      "Cache-Control": "private, no-store, no-transform",
      "X-Content-Type-Options": "nosniff",
    },
  });
});
