import "server-only";
import { Readable, Transform, type TransformCallback } from "node:stream";
import type { ReadableStream as WebReadableStream } from "node:stream/web";
import busboy from "busboy";
import { env } from "@/lib/env";
import { putObject } from "@/lib/storage/storage";

/** An upload problem answered with `status` and a message for people. */
export class UploadError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = "UploadError";
  }
}

/** "1 GB", "250 MB", "12 kB" (decimal units, as file managers show sizes). */
export function formatBytes(n: number): string {
  if (n >= 1e9) return `${+(n / 1e9).toFixed(2)} GB`;
  if (n >= 1e6) return `${+(n / 1e6).toFixed(1)} MB`;
  if (n >= 1e3) return `${+(n / 1e3).toFixed(0)} kB`;
  return `${n} bytes`;
}

export function tooLargeMessage(limit: number): string {
  return `The file is larger than the upload limit of ${formatBytes(limit)}. Split it into parts (e.g. one per year), or ask the operator to raise IMPORT_MAX_BYTES.`;
}

/** Multipart framing around the file: generous, so a file just under the limit is never refused early. */
const MULTIPART_SLACK = 1 << 20;

/** Passes bytes through and fails once more than `limit` have gone by. */
class LimitStream extends Transform {
  bytes = 0;
  constructor(private readonly limit: number) {
    super();
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, cb: TransformCallback): void {
    this.bytes += chunk.length;
    if (this.bytes > this.limit) cb(new UploadError(413, "too_large", tooLargeMessage(this.limit)));
    else cb(null, chunk);
  }
}

/**
 * The name as shown in the import history: the last path segment (busboy already drops the
 * rest), control characters removed, at most 255 characters without splitting a character.
 */
export function cleanFileName(raw: string | undefined): string {
  const base = (raw ?? "").split(/[\\/]/).pop()?.replace(/[\u0000-\u001f\u007f-\u009f]/g, "").trim() ?? "";
  const name = base === "" || base === "." || base === ".." ? "upload.csv" : base;
  // The column holds 255 characters; a UTF-16 slice could split an emoji in two.
  let out = "";
  for (const ch of name) {
    if (out.length + ch.length > 255) break;
    out += ch;
  }
  return out;
}

export type StoredUpload = {
  sha256: string;
  size: number;
  key: string;
  filename: string;
  /** Text fields of the form (e.g. "mapping"). */
  fields: Record<string, string>;
};

/**
 * Streams the `file` part of a multipart request into storage (never holding the file in memory),
 * enforcing the size limit as bytes arrive; other parts are read as small text fields.
 */
export async function receiveUpload(request: Request, limit: number = env.IMPORT_MAX_BYTES): Promise<StoredUpload> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.toLowerCase().startsWith("multipart/form-data")) {
    throw new UploadError(415, "unsupported_media_type", 'Send the file as multipart/form-data with a part named "file".');
  }
  const declared = Number(request.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > limit + MULTIPART_SLACK) {
    throw new UploadError(413, "too_large", tooLargeMessage(limit));
  }
  if (!request.body) throw new UploadError(422, "no_file", 'The request has no body; send the file in a part named "file".');

  const fields: Record<string, string> = {};
  const holder: { stored: Promise<{ sha256: string; size: number; key: string }> | null } = { stored: null };
  let filename = "";

  let bb: ReturnType<typeof busboy>;
  try {
    bb = busboy({
      headers: { "content-type": type },
      limits: { files: 1, fields: 20, fieldSize: 256 * 1024 },
    });
  } catch (e) {
    // busboy throws at once on a content-type it cannot frame (e.g. no boundary).
    throw new UploadError(400, "bad_multipart", `The upload could not be read: ${e instanceof Error ? e.message : String(e)}.`);
  }
  let extraFiles = false;
  const finished = new Promise<void>((resolve, reject) => {
    bb.on("field", (name, value, info) => {
      if (info.valueTruncated) {
        reject(new UploadError(413, "field_too_large", `The form field "${name.slice(0, 40)}" is longer than 256 kB.`));
        return;
      }
      fields[name] = value;
    });
    // A second file would be dropped without a word; one file per upload keeps every file's report.
    bb.on("filesLimit", () => {
      extraFiles = true;
    });
    bb.on("file", (name, file, info) => {
      if (name !== "file" || holder.stored) {
        file.resume();
        return;
      }
      filename = cleanFileName(info.filename);
      const limiter = new LimitStream(limit);
      file.on("error", (e: Error) => limiter.destroy(e));
      // Storage may attach its reader a tick later; an early size error must not go unheard.
      limiter.on("error", () => undefined);
      file.pipe(limiter);
      const stored = putObject(limiter);
      // A failed store (size limit, disk) ends the whole upload at once; the rest of the body is dropped.
      stored.catch((e: unknown) => {
        file.resume();
        reject(e instanceof Error ? e : new Error(String(e)));
        // Stop reading the request: a sender without Content-Length could otherwise stream on for ever.
        body.unpipe(bb);
        body.destroy();
      });
      holder.stored = stored;
    });
    bb.on("error", (e: unknown) => reject(e instanceof Error ? new UploadError(400, "bad_multipart", `The upload could not be read: ${e.message}`) : new Error(String(e))));
    bb.on("close", () => resolve());
  });
  const body = Readable.fromWeb(request.body as unknown as WebReadableStream<Uint8Array>);
  body.on("error", (e) => bb.destroy(e));
  body.pipe(bb);
  await finished;
  if (extraFiles) {
    // The first file is already stored under its content hash; no import row points to it.
    await holder.stored?.catch(() => undefined);
    throw new UploadError(422, "too_many_files", "Send one file per upload; this request had more than one.");
  }
  if (!holder.stored) throw new UploadError(422, "no_file", 'No file was sent; put it in a part named "file".');
  const result = await holder.stored;
  return { ...result, filename, fields };
}
