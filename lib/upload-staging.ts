import "server-only";
import { randomUUID } from "node:crypto";
import type { PoolClient } from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { pool } from "@/db";

/**
 * Streams a large upload into `program_file_uploads` while it arrives (binary COPY on a connection of its own), so
 * that writing the bytes to PostgreSQL overlaps receiving them. The COPY's transaction commits only in `finish()`,
 * after the caller checked the bytes; `abort()` (or any failure) rolls it back and nothing is left. The upload's
 * own transaction then moves the bytes into program_files (lib/dal/revisions.ts, storeFile).
 */
export interface StagedUpload {
  uploadId: string;
  write(chunk: Uint8Array): Promise<void>;
  /** Ends the COPY (the server keeps writing while the caller checks the bytes). */
  end(): void;
  /** Waits for the COPY (after end()) and commits; resolves when the bytes are in the staging table. */
  commit(): Promise<void>;
  abort(): Promise<void>;
}

/** Uploads from this size on are streamed; smaller ones are written in one go with their revision. */
export const STAGE_FROM_BYTES = 4 * 1024 * 1024;

const PGCOPY_HEADER = Buffer.concat([Buffer.from("PGCOPY\n\xff\r\n\0", "latin1"), Buffer.alloc(8)]);

/** Opens a staging COPY for exactly `size` bytes, or returns null when no connection is free right now. */
export async function stageUpload(size: number): Promise<StagedUpload | null> {
  let client: PoolClient;
  try {
    // Never queue behind a busy pool for this: the upload then simply takes the in-memory path.
    if (pool().idleCount === 0 && pool().totalCount >= (pool().options.max ?? 10) - 1) return null;
    client = await pool().connect();
  } catch {
    return null;
  }
  const uploadId = randomUUID();
  let released = false;
  const release = (err?: Error) => {
    if (!released) {
      released = true;
      client.release(err);
    }
  };
  try {
    await client.query("begin");
  } catch (e) {
    release(e as Error);
    return null;
  }
  const stream = client.query(copyFrom("copy program_file_uploads (upload_id, bytes) from stdin (format binary)"));
  let failed: Error | null = null;
  stream.on("error", (e: Error) => {
    failed = e;
  });
  const done = new Promise<void>((resolve, reject) => {
    stream.on("finish", resolve);
    stream.on("error", reject);
  });
  done.catch(() => undefined);
  const write = (b: Uint8Array) =>
    new Promise<void>((resolve, reject) => {
      if (failed) return reject(failed);
      if (stream.write(b)) resolve();
      else stream.once("drain", resolve);
    });
  // Row: 2 fields; uuid (16 bytes); bytea (size bytes), then the trailer after the data.
  const head = Buffer.alloc(2 + 4 + 16 + 4);
  head.writeInt16BE(2, 0);
  head.writeInt32BE(16, 2);
  Buffer.from(uploadId.replace(/-/g, ""), "hex").copy(head, 6);
  head.writeInt32BE(size, 22);
  await write(PGCOPY_HEADER);
  await write(head);

  const rollback = async () => {
    if (released) return;
    try {
      if (!stream.writableEnded) stream.destroy();
      await client.query("rollback");
      release();
    } catch (e) {
      // A connection in an unknown state is dropped, not reused.
      release(e as Error);
    }
  };
  return {
    uploadId,
    write,
    end() {
      const trailer = Buffer.alloc(2);
      trailer.writeInt16BE(-1);
      stream.end(trailer);
    },
    async commit() {
      try {
        await done;
        await client.query("commit");
        release();
      } catch (e) {
        await rollback();
        throw e;
      }
    },
    abort: rollback,
  };
}
