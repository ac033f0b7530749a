import "server-only";
import { createReadStream } from "node:fs";
import { rm } from "node:fs/promises";
import { Readable } from "node:stream";
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import { writeHashedTemp } from "@/lib/storage/hashed-temp";
import { StorageError, assertObjectKey, keyForSha256, type ObjectStorage } from "@/lib/storage/types";

export interface S3Settings {
  bucket: string;
  /** custom endpoint of an S3-compatible service; path-style addressing is used with it */
  endpoint?: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
}

function isNotFound(err: unknown): boolean {
  if (err instanceof S3ServiceException) return err.$metadata.httpStatusCode === 404 || err.name === "NotFound" || err.name === "NoSuchKey";
  return false;
}

/**
 * Objects in an S3-compatible bucket under "objects/<sha[0..2]>/<sha>". The bytes are first
 * written to a local temp file (the key is their hash, known only at the end), then sent with
 * a single PUT of known length.
 */
export function createS3Storage(settings: S3Settings, tmpDir: string): ObjectStorage {
  const client = new S3Client({
    region: settings.region,
    ...(settings.endpoint ? { endpoint: settings.endpoint, forcePathStyle: true } : {}),
    credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey },
    // Several S3-compatible services reject the SDK's default extra checksums.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  });
  const Bucket = settings.bucket;
  const objectKey = (key: string) => {
    assertObjectKey(key);
    return `objects/${key}`;
  };
  const exists = async (key: string) => {
    try {
      await client.send(new HeadObjectCommand({ Bucket, Key: objectKey(key) }));
      return true;
    } catch (err) {
      if (isNotFound(err)) return false;
      throw err;
    }
  };

  return {
    async putObject(input) {
      const t = await writeHashedTemp(input, tmpDir);
      const key = keyForSha256(t.sha256);
      try {
        if (!(await exists(key))) {
          await client.send(
            new PutObjectCommand({
              Bucket,
              Key: objectKey(key),
              Body: createReadStream(t.path),
              ContentLength: t.size,
              ContentType: "application/octet-stream",
              Metadata: { sha256: t.sha256 },
            }),
          );
        }
      } finally {
        await rm(t.path, { force: true });
      }
      return { sha256: t.sha256, size: t.size, key };
    },

    async getObject(key) {
      try {
        const res = await client.send(new GetObjectCommand({ Bucket, Key: objectKey(key) }));
        if (res.Body instanceof Readable) return res.Body;
        throw new Error(`unexpected body type for object ${key}`);
      } catch (err) {
        if (isNotFound(err)) throw new StorageError("not_found", `no stored object ${key}`);
        throw err;
      }
    },

    async deleteObject(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: objectKey(key) }));
    },

    exists,
  };
}
