import "server-only";
import path from "node:path";
import type { Readable } from "node:stream";
import { env } from "@/lib/env";
import { createLocalStorage } from "@/lib/storage/local";
import type { ObjectInput, ObjectStorage, StoredObject } from "@/lib/storage/types";

/*
 * The app's object storage, chosen by the environment: S3-compatible when S3_BUCKET is set,
 * otherwise files under DATA_DIR/objects. The S3 client is loaded only when used.
 */

const globalForStorage = globalThis as unknown as { gloamingStorage?: Promise<ObjectStorage> };

async function open(): Promise<ObjectStorage> {
  const root = path.join(env.DATA_DIR, "objects");
  if (!env.S3) return createLocalStorage(root);
  const { createS3Storage } = await import("@/lib/storage/s3");
  return createS3Storage(env.S3, path.join(env.DATA_DIR, "tmp", "uploads"));
}

/** The configured storage (one per process). */
export function storage(): Promise<ObjectStorage> {
  globalForStorage.gloamingStorage ??= open();
  return globalForStorage.gloamingStorage;
}

/** Streams bytes into storage keyed by their SHA-256; see ObjectStorage.putObject. */
export async function putObject(input: ObjectInput): Promise<StoredObject> {
  return (await storage()).putObject(input);
}

/** A stream of a stored object's bytes; StorageError "not_found" when missing. */
export async function getObject(key: string): Promise<Readable> {
  return (await storage()).getObject(key);
}

/** Removes a stored object (no error when it is already gone). */
export async function deleteObject(key: string): Promise<void> {
  return (await storage()).deleteObject(key);
}

/** Whether an object with this key is stored. */
export async function objectExists(key: string): Promise<boolean> {
  return (await storage()).exists(key);
}
