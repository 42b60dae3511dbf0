import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { readRevisionFile } from "@/lib/dal/revisions";
import { attachmentDisposition } from "@/lib/program-file";
import { parseId, route } from "@/lib/http";

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
  return new Response(new Uint8Array(file.bytes.buffer as ArrayBuffer, file.bytes.byteOffset, file.bytes.byteLength), {
    headers: {
      "Content-Type": "application/octet-stream",
      "Content-Length": String(file.bytes.byteLength),
      "Content-Disposition": attachmentDisposition(file.fileName),
      "X-Content-SHA256": file.sha256,
      ETag: `"${file.sha256}"`,
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
    },
  });
});
