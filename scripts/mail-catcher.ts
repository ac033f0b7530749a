/*
 * The local SMTP catcher (`npm start` runs it next to the app when no SMTP_HOST is set):
 * stores every message under MAIL_DIR (default DATA_DIR/mail) for the /mail page.
 * Alone: `tsx --conditions=react-server scripts/mail-catcher.ts`.
 */
import { pathToFileURL } from "node:url";
import { env } from "../lib/env";
import { startMailCatcher, type RunningCatcher } from "../lib/mail/catcher";

/** Starts the catcher on MAIL_CATCHER_PORT; resolves to null when real SMTP is configured. */
export async function startCatcherFromEnv(): Promise<RunningCatcher | null> {
  if (!env.MAIL_CATCHER) return null;
  const catcher = await startMailCatcher({ dir: env.MAIL_DIR, port: env.MAIL_CATCHER_PORT });
  console.log(`[mail] catching mail on smtp://${catcher.host}:${catcher.port}, stored in ${catcher.dir}`);
  return catcher;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  startCatcherFromEnv()
    .then((c) => {
      if (!c) console.log("[mail] SMTP_HOST is set; no catcher needed.");
      else for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => void c.close().then(() => process.exit(0)));
    })
    .catch((err: unknown) => {
      console.error(`[mail] ${err instanceof Error ? err.message : String(err)}`);
      process.exit(1);
    });
}
