import { createHash } from "node:crypto";
import { mkdtemp, readdir, rm, stat } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { text } from "node:stream/consumers";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { env } from "@/lib/env";
import { createLocalStorage } from "@/lib/storage/local";
import { deleteObject, getObject, objectExists, putObject } from "@/lib/storage/storage";
import { StorageError, type ObjectStorage } from "@/lib/storage/types";

let root: string;
let store: ObjectStorage;
beforeAll(async () => {
  root = await mkdtemp(path.join(tmpdir(), "gloaming-storage-"));
  store = createLocalStorage(root);
});
afterAll(async () => {
  await rm(root, { recursive: true, force: true });
});

async function* chunks(parts: Array<string | Uint8Array>) {
  for (const p of parts) yield typeof p === "string" ? Buffer.from(p) : p;
}

const sha = (b: Buffer) => createHash("sha256").update(b).digest("hex");

describe("local object storage", () => {
  it("stores bytes under their SHA-256 and reads them back", async () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc")
    const abc = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";
    const stored = await store.putObject(chunks(["a", "b", "c"]));
    expect(stored).toEqual({ sha256: abc, size: 3, key: `ba/${abc}` });
    expect(await text(await store.getObject(stored.key))).toBe("abc");
    const file = path.join(root, "ba", abc);
    const st = await stat(file);
    expect(st.isFile()).toBe(true);
    expect(st.mode & 0o222).toBe(0); // read-only: originals are never edited in place
    expect(await store.exists(stored.key)).toBe(true);
  });

  it("streams a multi-megabyte body in chunks with the right hash and size", async () => {
    const block = Buffer.alloc(64 * 1024);
    for (let i = 0; i < block.length; i++) block[i] = (i * 31 + 7) & 0xff;
    const parts = Array.from({ length: 80 }, (_, i) => Buffer.from(block.map((b) => (b + i) & 0xff)));
    const whole = Buffer.concat(parts);
    const stored = await store.putObject(Readable.from(parts));
    expect(stored.size).toBe(whole.length);
    expect(stored.sha256).toBe(sha(whole));
    const back: Buffer[] = [];
    for await (const c of await store.getObject(stored.key)) back.push(c as Buffer);
    expect(Buffer.concat(back).equals(whole)).toBe(true);
  });

  it("keeps one copy when the same bytes are stored twice", async () => {
    const a = await store.putObject(chunks(["same bytes\n", "twice"]));
    const b = await store.putObject(chunks(["same ", "bytes\ntwice"]));
    expect(b).toEqual(a);
    expect(await readdir(path.join(root, a.key.slice(0, 2)))).toEqual([a.sha256]);
  });

  it("keeps nothing when the input fails part-way, and passes the input's error on", async () => {
    const before = await readdir(root, { recursive: true });
    async function* broken() {
      yield Buffer.from("half a file");
      throw new Error("connection reset by peer");
    }
    await expect(store.putObject(broken())).rejects.toThrow("connection reset by peer");
    expect(await readdir(path.join(root, ".tmp"))).toEqual([]);
    expect((await readdir(root, { recursive: true })).sort()).toEqual(before.sort());
  });

  it("answers a missing object with not_found and refuses keys that are not its own", async () => {
    const missing = `00/${"0".repeat(64)}`;
    await expect(store.getObject(missing)).rejects.toMatchObject({ name: "StorageError", code: "not_found" });
    expect(await store.exists(missing)).toBe(false);
    for (const bad of ["../../etc/passwd", `ab/${"0".repeat(64)}`, "ab/cd", `../${"a".repeat(64)}`]) {
      await expect(store.getObject(bad)).rejects.toBeInstanceOf(StorageError);
      await expect(store.deleteObject(bad)).rejects.toMatchObject({ code: "bad_key" });
    }
  });

  it("deletes an object, and deleting it again is not an error", async () => {
    const stored = await store.putObject(chunks(["to be deleted"]));
    await store.deleteObject(stored.key);
    expect(await store.exists(stored.key)).toBe(false);
    await expect(store.deleteObject(stored.key)).resolves.toBeUndefined();
  });

  it("the app's default storage keeps objects under DATA_DIR/objects/<sha[0..2]>/<sha>", async () => {
    const body = `default storage check ${Date.now()} ${Math.random()}`;
    const stored = await putObject(chunks([body]));
    expect(stored.sha256).toBe(sha(Buffer.from(body)));
    const file = path.join(env.DATA_DIR, "objects", stored.sha256.slice(0, 2), stored.sha256);
    expect((await stat(file)).size).toBe(Buffer.byteLength(body));
    expect(await objectExists(stored.key)).toBe(true);
    expect(await text(await getObject(stored.key))).toBe(body);
    await deleteObject(stored.key);
  });
});
