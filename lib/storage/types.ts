import "server-only";
import type { Readable } from "node:stream";

/** What putObject stored: the SHA-256 and length of the bytes, and the key to read them back. */
export interface StoredObject {
  /** lower-case hex SHA-256 of the bytes */
  sha256: string;
  /** bytes */
  size: number;
  /** storage key, "<sha256[0..2]>/<sha256>" */
  key: string;
}

/** Bytes the storage accepts: a Node stream or any async iterable of chunks. */
export type ObjectInput = NodeJS.ReadableStream | AsyncIterable<Uint8Array | string>;

/**
 * Content-addressed object storage for originals and reports. Objects are immutable and named
 * by their SHA-256, so storing the same bytes twice keeps one copy.
 */
export interface ObjectStorage {
  /** Streams `input` to storage, hashing as it goes; nothing is kept when the input fails. */
  putObject(input: ObjectInput): Promise<StoredObject>;
  /** A stream of the object's bytes; StorageError "not_found" when there is none. */
  getObject(key: string): Promise<Readable>;
  /** Removes the object; a missing object is not an error. */
  deleteObject(key: string): Promise<void>;
  exists(key: string): Promise<boolean>;
}

export class StorageError extends Error {
  constructor(
    readonly code: "not_found" | "bad_key",
    message: string,
  ) {
    super(message);
    this.name = "StorageError";
  }
}

const KEY = /^([0-9a-f]{2})\/([0-9a-f]{64})$/;

/** The storage key of bytes with this SHA-256 (hex). */
export function keyForSha256(sha256: string): string {
  return `${sha256.slice(0, 2)}/${sha256}`;
}

/** Throws StorageError "bad_key" unless `key` is a key this storage hands out (no paths smuggled in). */
export function assertObjectKey(key: string): void {
  const m = KEY.exec(key);
  if (!m || !m[2]?.startsWith(m[1] ?? "")) throw new StorageError("bad_key", `not a storage key: ${JSON.stringify(key)}`);
}
