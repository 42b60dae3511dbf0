import "server-only";
import { createHash } from "node:crypto";
import { Readable } from "node:stream";
import busboy from "busboy";
import { RequestError } from "@/lib/auth/errors";
import { checkTextProgram } from "@/lib/gcode";
import { cleanFileName, countLines } from "@/lib/program-file";
import { STAGE_FROM_BYTES, stageUpload, type StagedUpload } from "@/lib/upload-staging";

/** A program file received whole, hashed while it streamed in. */
export interface ReceivedProgram {
  bytes: Buffer;
  size: number;
  sha256: string;
  lineCount: number;
  /** Cleaned display label. */
  fileName: string;
  /** Set when the bytes were streamed into program_file_uploads as they arrived (large uploads). */
  stagedUploadId?: string;
}

const SHA256_HEADER = "x-content-sha256";
const NAME_HEADER = "x-file-name";
/** Body types read as the raw file. curl's default for --data-binary (form-urlencoded) is taken as raw bytes too. */
const RAW_TYPES = /^(text\/plain|application\/octet-stream|application\/x-www-form-urlencoded)\b/i;

const tooLarge = (max: number) =>
  new RequestError(413, `The file is larger than the limit of ${max} bytes (${(max / 1024 / 1024).toFixed(0)} MiB).`);

/** Maps checkTextProgram's refusal to a status: NUL or binary bytes 415, everything else (bad UTF-8) 422. */
export function textRefusal(bytes: Uint8Array): RequestError | null {
  if (bytes.length === 0) return new RequestError(422, "The file is empty.");
  const check = checkTextProgram(bytes);
  if (check.ok) return null;
  const binary = /NUL|binary/i.test(check.reason);
  const reason = check.reason.charAt(0).toUpperCase() + check.reason.slice(1);
  return new RequestError(binary ? 415 : /larger than/.test(check.reason) ? 413 : 422, `${reason}.`);
}

function expectedSha(req: Request): string | null {
  const raw = req.headers.get(SHA256_HEADER);
  if (raw === null) return null;
  const v = raw.trim().toLowerCase();
  if (!/^[0-9a-f]{64}$/.test(v)) throw new RequestError(400, `${SHA256_HEADER} must be 64 hexadecimal characters.`);
  return v;
}

function headerName(req: Request): string | null {
  const raw = req.headers.get(NAME_HEADER) ?? new URL(req.url).searchParams.get("name");
  if (raw === null) return null;
  try {
    return decodeURIComponent(raw);
  } catch {
    return raw;
  }
}

/** Reads a stream to the end, hashing and counting; stops with 413 at the first byte over `max`. */
async function collect(
  stream: AsyncIterable<Uint8Array>,
  max: number,
  onAbort?: () => void,
  onChunk?: (chunk: Uint8Array) => Promise<void>,
): Promise<{ bytes: Buffer; sha256: string }> {
  const hash = createHash("sha256");
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of stream) {
    size += chunk.length;
    if (size > max) {
      onAbort?.();
      throw tooLarge(max);
    }
    hash.update(chunk);
    chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength));
    if (onChunk) await onChunk(chunk);
  }
  return { bytes: Buffer.concat(chunks, size), sha256: hash.digest("hex") };
}

/** The `file` part of a multipart body, streamed through busboy. */
async function readMultipart(req: Request, max: number): Promise<{ bytes: Buffer; sha256: string; name: string | null }> {
  if (!req.body) throw new RequestError(422, "The file is empty.");
  let bb: busboy.Busboy;
  try {
    bb = busboy({ headers: { "content-type": req.headers.get("content-type") ?? "" }, limits: { files: 1, fields: 20, fileSize: max + 1, fieldSize: 4096 } });
  } catch {
    throw new RequestError(400, "The multipart body has no valid boundary.");
  }
  const body = Readable.fromWeb(req.body as import("node:stream/web").ReadableStream<Uint8Array>);
  return new Promise((resolve, reject) => {
    let got: Promise<{ bytes: Buffer; sha256: string; name: string | null }> | null = null;
    const fail = (e: unknown) => {
      body.unpipe(bb);
      body.destroy();
      reject(e);
    };
    bb.on("file", (field, stream, info) => {
      if (field !== "file") {
        stream.resume();
        return;
      }
      got = collect(stream, max, () => stream.resume()).then((r) => ({ ...r, name: info.filename ?? null }));
      got.catch(fail);
    });
    bb.on("error", () => fail(new RequestError(400, "The multipart body is malformed.")));
    bb.on("close", () => {
      if (!got) return fail(new RequestError(422, "Send the program in a multipart field named \"file\"."));
      got.then(resolve, fail);
    });
    body.on("error", (e) => fail(e));
    body.pipe(bb);
  });
}

/**
 * Reads an uploaded program from a route handler's request: the raw body (text/plain, application/octet-stream)
 * or the multipart field `file`. Streams it with a running size count and SHA-256: 413 as soon as it passes `max`
 * (before the rest is read; at once when Content-Length says so), 422 when empty or not UTF-8, 415 with NUL or
 * binary bytes, 422 when the client's X-Content-SHA256 differs. The name comes from X-File-Name (may be
 * percent-encoded), `?name=` or the multipart filename, and is cleaned to a display label.
 */
export async function receiveProgram(req: Request, max: number): Promise<ReceivedProgram> {
  try {
    return await receive(req, max);
  } catch (e) {
    if (e instanceof RequestError) throw e;
    // The client went away mid-body (ECONNRESET, "aborted"): nothing was stored; nobody is left to read the answer.
    throw new RequestError(400, "The upload was interrupted before all its bytes arrived; nothing was stored.");
  }
}

async function receive(req: Request, max: number): Promise<ReceivedProgram> {
  let stage: StagedUpload | null = null;
  try {
    const file = await receiveInto(req, max, (s) => (stage = s));
    if (stage) {
      await (stage as StagedUpload).commit();
      file.stagedUploadId = (stage as StagedUpload).uploadId;
    }
    return file;
  } catch (e) {
    await (stage as StagedUpload | null)?.abort();
    throw e;
  }
}

async function receiveInto(req: Request, max: number, staged: (s: StagedUpload) => void): Promise<ReceivedProgram> {
  let stage: StagedUpload | null = null;
  const type = req.headers.get("content-type") ?? "application/octet-stream";
  const declared = req.headers.get("content-length");
  const sha = expectedSha(req);
  let received: { bytes: Buffer; sha256: string; name: string | null };
  if (/^multipart\/form-data\b/i.test(type)) {
    received = await readMultipart(req, max);
  } else if (RAW_TYPES.test(type)) {
    if (declared !== null && Number(declared) > max) throw tooLarge(max);
    const length = declared !== null && /^\d+$/.test(declared) ? Number(declared) : null;
    // A large body of known length is written to PostgreSQL while it arrives (see lib/upload-staging.ts).
    stage = length !== null && length >= STAGE_FROM_BYTES && req.body ? await stageUpload(length) : null;
    if (stage) staged(stage);
    const r = req.body
      ? await collect(req.body as unknown as AsyncIterable<Uint8Array>, max, undefined, stage ? (c) => stage!.write(c) : undefined)
      : { bytes: Buffer.alloc(0), sha256: "" };
    // A body shorter than it said it would be was cut off: refuse it rather than store a piece.
    if (length !== null && length !== r.bytes.length) {
      throw new RequestError(400, "The upload ended before all its bytes arrived.");
    }
    stage?.end();
    received = { ...r, name: headerName(req) };
  } else {
    throw new RequestError(415, "Send the program as text/plain, application/octet-stream or multipart/form-data (field \"file\").");
  }
  const refusal = textRefusal(received.bytes);
  if (refusal) throw refusal;
  if (sha !== null && sha !== received.sha256) {
    throw new RequestError(422, "The SHA-256 you sent does not match the bytes received; nothing was stored.", {
      fieldErrors: { sha256: [`received ${received.sha256}`] },
    });
  }
  return {
    bytes: received.bytes,
    size: received.bytes.length,
    sha256: received.sha256,
    lineCount: countLines(received.bytes),
    fileName: cleanFileName(received.name ?? headerName(req)),
  };
}

/** Server-Timing for an upload answer: receiving (with hashing and checks), storing, and whether it was streamed. */
export function uploadTiming(t0: number, t1: number, file: ReceivedProgram): string {
  const parts = [`receive;dur=${(t1 - t0).toFixed(1)}`, `store;dur=${(performance.now() - t1).toFixed(1)}`];
  if (file.stagedUploadId) parts.push('staged;desc="streamed to the database while arriving"');
  return parts.join(", ");
}
