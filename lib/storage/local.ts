import "server-only";
import { createReadStream } from "node:fs";
import { chmod, mkdir, rename, rm, stat } from "node:fs/promises";
import path from "node:path";
import type { Readable } from "node:stream";
import { writeHashedTemp } from "@/lib/storage/hashed-temp";
import { StorageError, assertObjectKey, keyForSha256, type ObjectStorage } from "@/lib/storage/types";

function isMissing(err: unknown): boolean {
  return (err as NodeJS.ErrnoException | null)?.code === "ENOENT";
}

/**
 * Objects as files under `root`: `<root>/<sha[0..2]>/<sha>`. Writes go to `<root>/.tmp` first and
 * are renamed into place (same file system, so an object is either complete or absent).
 */
export function createLocalStorage(root: string): ObjectStorage {
  const tmpDir = path.join(root, ".tmp");
  const fileOf = (key: string) => {
    assertObjectKey(key);
    return path.join(root, ...key.split("/"));
  };
  const exists = async (key: string) => {
    try {
      return (await stat(fileOf(key))).isFile();
    } catch (err) {
      if (isMissing(err)) return false;
      throw err;
    }
  };

  return {
    async putObject(input) {
      const t = await writeHashedTemp(input, tmpDir);
      const key = keyForSha256(t.sha256);
      const file = fileOf(key);
      try {
        if (await exists(key)) {
          await rm(t.path, { force: true });
        } else {
          await mkdir(path.dirname(file), { recursive: true });
          // originals are never edited in place
          await chmod(t.path, 0o444);
          await rename(t.path, file);
        }
      } catch (err) {
        await rm(t.path, { force: true });
        throw err;
      }
      return { sha256: t.sha256, size: t.size, key };
    },

    async getObject(key): Promise<Readable> {
      const file = fileOf(key);
      try {
        await stat(file);
      } catch (err) {
        if (isMissing(err)) throw new StorageError("not_found", `no stored object ${key}`);
        throw err;
      }
      return createReadStream(file);
    },

    async deleteObject(key) {
      await rm(fileOf(key), { force: true });
    },

    exists,
  };
}
