import "server-only";
import { createHash, randomBytes } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, rm } from "node:fs/promises";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { ObjectInput } from "@/lib/storage/types";

/**
 * Writes `input` to a new file in `dir`, computing its SHA-256 and length on the way (the bytes
 * are never held whole in memory). The file is flushed to disk before this resolves; on any
 * error it is removed and the error (e.g. the input's own) is rethrown.
 */
export async function writeHashedTemp(input: ObjectInput, dir: string): Promise<{ path: string; sha256: string; size: number }> {
  await mkdir(dir, { recursive: true });
  const tmp = path.join(dir, `${Date.now()}-${process.pid}-${randomBytes(6).toString("hex")}.part`);
  const hash = createHash("sha256");
  let size = 0;
  const source = input instanceof Readable ? input : Readable.from(input as AsyncIterable<Uint8Array | string>);
  try {
    await pipeline(
      source,
      async function* (chunks: AsyncIterable<Uint8Array | string>) {
        for await (const chunk of chunks) {
          const b = typeof chunk === "string" ? Buffer.from(chunk, "utf8") : chunk;
          hash.update(b);
          size += b.byteLength;
          yield b;
        }
      },
      createWriteStream(tmp, { flags: "wx", flush: true }),
    );
  } catch (err) {
    await rm(tmp, { force: true });
    throw err;
  }
  return { path: tmp, sha256: hash.digest("hex"), size };
}
