import "server-only";
import { env } from "@/lib/env";

export type ConnectionSettings = {
  host: string;
  port: number;
  user: string;
  password: string;
  database?: string;
  charset: string;
  timezone: string;
  dateStrings: boolean;
  decimalNumbers: boolean;
  supportBigNumbers: boolean;
};

/**
 * mysql2 connection options parsed from a mysql:// URL.
 * Times travel as UTC ("Z") and DECIMAL columns arrive as numbers, so the app never
 * sees server-local time or numeric strings.
 */
export function connectionOptions(url: string = env.DATABASE_URL): ConnectionSettings {
  const u = new URL(url);
  const database = decodeURIComponent(u.pathname.replace(/^\//, ""));
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : 3306,
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    ...(database ? { database } : {}),
    charset: "utf8mb4",
    timezone: "Z",
    dateStrings: false,
    decimalNumbers: true,
    supportBigNumbers: true,
  };
}

/** The statement each new connection runs so NOW() and DEFAULT CURRENT_TIMESTAMP are UTC. */
export const UTC_SESSION_SQL = "SET time_zone = '+00:00'";
