import "server-only";
import path from "node:path";
import { z } from "zod";

/*
 * The one place that reads process.env. Scripts (db server, knex CLI, seeds) load it too;
 * they run under the `react-server` export condition so that `server-only` resolves.
 */

const booleanFlag = z
  .enum(["true", "false", "1", "0", "yes", "no"])
  .transform((v) => v === "true" || v === "1" || v === "yes");

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z
    .string()
    .regex(/^mysql:\/\//, "DATABASE_URL must start with mysql://")
    .optional(),
  DB_PORT: z.coerce.number().int().min(1).max(65535).default(3307),
  DB_NAME: z
    .string()
    .regex(/^[A-Za-z0-9_]+$/, "DB_NAME may contain letters, digits and _ only")
    .default("gloaming"),
  APP_URL: z.url().default("http://localhost:3000"),
  DATA_DIR: z.string().min(1).default(".data"),
  DEMO_MODE: booleanFlag.optional(),
  // S3-compatible object storage for originals; local disk under DATA_DIR when S3_BUCKET is unset.
  S3_BUCKET: z.string().min(1).optional(),
  S3_ENDPOINT: z.url().optional(),
  S3_REGION: z.string().min(1).optional(),
  S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  // Largest accepted upload, bytes (default 1 GB).
  IMPORT_MAX_BYTES: z.coerce.number().int().min(1).default(1_000_000_000),
  // Outgoing mail. Without SMTP_HOST the app sends to the local catcher on MAIL_CATCHER_PORT.
  SMTP_HOST: z.string().min(1).optional(),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).optional(),
  SMTP_USER: z.string().min(1).optional(),
  SMTP_PASS: z.string().optional(),
  SMTP_SECURE: booleanFlag.optional(),
  MAIL_FROM: z.string().min(3).default("Gloaming <no-reply@gloaming.localhost>"),
  MAIL_CATCHER_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  MAIL_DIR: z.string().min(1).optional(),
});

const parsed = schema.safeParse(process.env);
if (!parsed.success) {
  const problems = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
  throw new Error(`Invalid environment:\n${problems}`);
}
const raw = parsed.data;
if (raw.S3_BUCKET !== undefined) {
  const missing = (["S3_REGION", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY"] as const).filter((k) => raw[k] === undefined);
  if (missing.length > 0) throw new Error(`Invalid environment:\n  S3_BUCKET is set, so ${missing.join(", ")} must be set too`);
}

/** Credentials of the private loopback server; it listens on 127.0.0.1 only. */
export const privateServer = {
  host: "127.0.0.1",
  port: raw.DB_PORT,
  user: "gloaming",
  password: "gloaming-local",
} as const;

// The data directory is chosen at run time; keep Turbopack from tracing the whole project for it.
const dataDir = path.resolve(/*turbopackIgnore: true*/ raw.DATA_DIR);

export const env = {
  NODE_ENV: raw.NODE_ENV,
  /** True when the app uses its own private server (DATABASE_URL was not given). */
  USES_PRIVATE_SERVER: raw.DATABASE_URL === undefined,
  DATABASE_URL:
    raw.DATABASE_URL ??
    `mysql://${privateServer.user}:${privateServer.password}@${privateServer.host}:${privateServer.port}/${raw.DB_NAME}`,
  DB_PORT: raw.DB_PORT,
  DB_NAME: raw.DB_NAME,
  APP_URL: raw.APP_URL,
  /** Absolute path of the app's data directory (database files, uploads). */
  DATA_DIR: dataDir,
  DEMO_MODE: raw.DEMO_MODE ?? raw.NODE_ENV !== "production",
  SESSION_SECURE: raw.APP_URL.startsWith("https://"),
  /** Object storage for originals: S3-compatible when S3_BUCKET is set, else files under DATA_DIR/objects. */
  S3:
    raw.S3_BUCKET !== undefined
      ? {
          bucket: raw.S3_BUCKET,
          endpoint: raw.S3_ENDPOINT,
          region: raw.S3_REGION ?? "",
          accessKeyId: raw.S3_ACCESS_KEY_ID ?? "",
          secretAccessKey: raw.S3_SECRET_ACCESS_KEY ?? "",
        }
      : null,
  /** Largest accepted upload, bytes. */
  IMPORT_MAX_BYTES: raw.IMPORT_MAX_BYTES,
  /** True when mail goes to the local catcher (no SMTP_HOST given). */
  MAIL_CATCHER: raw.SMTP_HOST === undefined,
  SMTP_HOST: raw.SMTP_HOST ?? "127.0.0.1",
  SMTP_PORT: raw.SMTP_PORT ?? (raw.SMTP_HOST === undefined ? raw.MAIL_CATCHER_PORT : raw.SMTP_SECURE ? 465 : 587),
  SMTP_USER: raw.SMTP_USER,
  SMTP_PASS: raw.SMTP_PASS,
  /** Implicit TLS (port 465); otherwise STARTTLS is used when the server offers it. */
  SMTP_SECURE: raw.SMTP_SECURE ?? false,
  MAIL_FROM: raw.MAIL_FROM,
  MAIL_CATCHER_PORT: raw.MAIL_CATCHER_PORT,
  /** Absolute path where the local catcher stores messages (.eml + index.jsonl). */
  MAIL_DIR: path.resolve(/*turbopackIgnore: true*/ raw.MAIL_DIR ?? path.join(raw.DATA_DIR, "mail")),
} as const;

export type Env = typeof env;
