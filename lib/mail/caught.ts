import "server-only";
import { readFile } from "node:fs/promises";
import path from "node:path";
import type { CaughtMessage } from "@/lib/mail/catcher";
import { env } from "@/lib/env";

/**
 * Messages stored by the local catcher, newest first. A missing directory (nothing caught
 * yet, or mail goes to a real server) is an empty list.
 */
export async function listCaughtMessages(dir: string = env.MAIL_DIR): Promise<CaughtMessage[]> {
  let text: string;
  try {
    text = await readFile(path.join(dir, "index.jsonl"), "utf8");
  } catch (err) {
    if (typeof err === "object" && err !== null && "code" in err && err.code === "ENOENT") return [];
    throw err;
  }
  const out: CaughtMessage[] = [];
  for (const line of text.split("\n")) {
    if (!line.trim()) continue;
    try {
      out.push(JSON.parse(line) as CaughtMessage);
    } catch {
      /* a line cut short by a crash; the .eml is still there */
    }
  }
  return out.reverse();
}

/** One caught message by id, or null. */
export async function getCaughtMessage(id: string, dir: string = env.MAIL_DIR): Promise<CaughtMessage | null> {
  return (await listCaughtMessages(dir)).find((m) => m.id === id) ?? null;
}
