import { randomBytes } from "node:crypto";
import { appendFile, mkdir, readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";

/*
 * The local SMTP catcher for development, the demo and the tests: accepts every message on
 * loopback and stores it as <id>.eml plus one line of index.jsonl. It touches neither the
 * database nor secrets, so scripts and the test harness can run it anywhere.
 *
 * Like a real mail store it keeps one copy per Message-ID: a repeat (a sender that crashed
 * after our "250" and before it recorded the delivery sends again with the same Message-ID) is
 * answered "250" and noted in repeats.jsonl, not stored twice.
 */

/** One caught message as stored in index.jsonl. */
export type CaughtMessage = {
  id: string;
  messageId: string | null;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  /** ISO time the catcher received it */
  receivedAt: string;
  sizeBytes: number;
  /** file name of the raw message inside the catcher's directory */
  file: string;
};

export type RunningCatcher = {
  port: number;
  host: string;
  dir: string;
  /** messages stored and repeats dropped (same Message-ID) since this catcher started */
  stats: () => { stored: number; repeats: number };
  close: () => Promise<void>;
};

/** Message-IDs already stored in `index` (a restart keeps dropping repeats). */
async function storedMessageIds(index: string): Promise<Set<string>> {
  const seen = new Set<string>();
  let text = "";
  try {
    text = await readFile(index, "utf8");
  } catch {
    return seen;
  }
  for (const line of text.split("\n")) {
    try {
      const id = (JSON.parse(line) as Partial<CaughtMessage>).messageId;
      if (id) seen.add(id);
    } catch {
      /* empty or cut-short line */
    }
  }
  return seen;
}

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(a) ? a : a ? [a] : [];
  return list.flatMap((o) => o.value.map((v) => v.address ?? "")).filter(Boolean);
}

/** Starts the catcher on host:port (port 0 picks a free one) storing messages in `dir`. */
export async function startMailCatcher(opts: {
  dir: string;
  port?: number;
  host?: string;
}): Promise<RunningCatcher> {
  const host = opts.host ?? "127.0.0.1";
  await mkdir(opts.dir, { recursive: true });
  const index = path.join(opts.dir, "index.jsonl");
  const repeatsLog = path.join(opts.dir, "repeats.jsonl");
  const seen = await storedMessageIds(index);
  const counts = { stored: 0, repeats: 0 };
  // Appends are chained so concurrent sessions never interleave lines.
  let writing: Promise<unknown> = Promise.resolve();

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    banner: "Gloaming local mail catcher",
    logger: false,
    size: 25 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", callback);
      stream.on("end", () => {
        const raw = Buffer.concat(chunks);
        const store = async () => {
          const parsed = await simpleParser(raw);
          if (parsed.messageId && seen.has(parsed.messageId)) {
            counts.repeats++;
            const note = {
              messageId: parsed.messageId,
              receivedAt: new Date().toISOString(),
              sizeBytes: raw.length,
            };
            await appendFile(repeatsLog, `${JSON.stringify(note)}\n`);
            return;
          }
          const id = `${Date.now().toString(36)}-${randomBytes(4).toString("hex")}`;
          const file = `${id}.eml`;
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
          const entry: CaughtMessage = {
            id,
            messageId: parsed.messageId ?? null,
            from: session.envelope.mailFrom
              ? session.envelope.mailFrom.address
              : (addresses(parsed.from)[0] ?? ""),
            to: envelopeTo.length ? envelopeTo : addresses(parsed.to),
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : null,
            receivedAt: new Date().toISOString(),
            sizeBytes: raw.length,
            file,
          };
          await writeFile(path.join(opts.dir, file), raw);
          await appendFile(index, `${JSON.stringify(entry)}\n`);
          if (parsed.messageId) seen.add(parsed.messageId);
          counts.stored++;
        };
        const done = writing.then(store);
        writing = done.catch(() => undefined);
        // The sender hears "250" only once the message is on disk.
        done.then(
          () => callback(),
          (err: unknown) => callback(err instanceof Error ? err : new Error(String(err))),
        );
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? 0, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const address = server.server.address();
  const port = typeof address === "object" && address ? address.port : (opts.port ?? 0);
  return {
    port,
    host,
    dir: opts.dir,
    stats: () => ({ ...counts }),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
