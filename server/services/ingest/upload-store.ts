import { randomUUID } from "node:crypto";
import type { Database } from "@/db/client";
import { uploads } from "@/db/schema";
import type { Tx } from "./write-rows";

interface RawQuery {
  query(sql: string, params?: unknown[], options?: { blob?: Blob }): Promise<unknown>;
}

/** Doubles every `"` for a quoted CSV field. Works on bytes: 0x22 never occurs inside a multi-byte UTF-8 character. */
function escapeQuotes(chunk: Buffer): Buffer {
  let at = chunk.indexOf(0x22);
  if (at < 0) return chunk;
  const parts: Buffer[] = [];
  let from = 0;
  while (at >= 0) {
    parts.push(chunk.subarray(from, at + 1), Buffer.from('"'));
    from = at + 1;
    at = chunk.indexOf(0x22, from);
  }
  parts.push(chunk.subarray(from));
  return Buffer.concat(parts);
}

const quote = (s: string) => `"${s.replaceAll('"', '""')}"`;

export interface UploadRecord {
  versionId: string;
  resource: string;
  filename: string;
  byteSize: number;
  sha256: string;
  rowCount: number;
  options: Record<string, unknown>;
  chunks: Buffer[];
  uploadedBy: string | null;
}

/**
 * Keeps the raw file byte for byte. On PGlite the content goes in by COPY from a blob of the original chunks, so a
 * large file is never joined into one JavaScript string; PostgreSQL takes it as one parameter.
 */
export async function storeUpload(database: Database, tx: Tx, u: UploadRecord): Promise<string> {
  const client = database.kind === "pglite" ? (tx as unknown as { session?: { client?: RawQuery } }).session?.client : undefined;
  if (client) {
    const id = randomUUID();
    const head =
      [id, u.versionId, u.resource, u.filename].map(quote).join(",") +
      `,${u.byteSize},${quote(u.sha256)},${u.rowCount},${quote(JSON.stringify(u.options))},"`;
    const tail = `",${u.uploadedBy ? quote(u.uploadedBy) : ""}\n`;
    const blob = new Blob([head, ...u.chunks.map((c) => escapeQuotes(c) as unknown as BlobPart), tail]);
    await client.query(
      "COPY uploads (id, version_id, resource, filename, byte_size, sha256, row_count, options, content, uploaded_by) FROM '/dev/blob' WITH (FORMAT csv)",
      [],
      { blob },
    );
    return id;
  }
  const [row] = await tx
    .insert(uploads)
    .values({
      versionId: u.versionId,
      resource: u.resource,
      filename: u.filename,
      byteSize: u.byteSize,
      sha256: u.sha256,
      rowCount: u.rowCount,
      options: u.options,
      content: Buffer.concat(u.chunks).toString("utf8"),
      uploadedBy: u.uploadedBy,
    })
    .returning({ id: uploads.id });
  return row!.id;
}
