/*
 * Throwaway databases for tests and benchmarks: create one on a server, migrate it from zero with
 * the stock knex CLI (the same path `npm run db:migrate` takes), drop it afterwards.
 *
 * No app module is imported at the top: the bench children import this file in their measuring
 * stage too, where lib/env must first be read after the stage's own DATABASE_URL is set.
 */
import { spawnSync } from "node:child_process";
import { createConnection } from "mysql2/promise";

/** `url` with its database part replaced by `name`. */
export function databaseUrlFor(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${encodeURIComponent(name)}`;
  return u.toString();
}

/** The database part of a mysql:// URL ("" when it names none). */
export function databaseNameOf(url: string): string {
  return decodeURIComponent(new URL(url).pathname.slice(1));
}

async function adminConnection(adminUrl: string) {
  const { connectionOptions } = await import("@/lib/db/connection");
  return createConnection({ ...connectionOptions(adminUrl), database: undefined });
}

/**
 * Runs `knex migrate:latest` against `databaseUrl` in a child process. `env` is added to the
 * child's environment (DATABASE_URL always wins). Throws with the CLI's output when it fails.
 */
export function migrateDatabase(databaseUrl: string, opts: { cwd?: string; env?: NodeJS.ProcessEnv } = {}): void {
  const r = spawnSync(
    process.execPath,
    ["--conditions=react-server", "--import", "tsx", "node_modules/knex/bin/cli.js", "migrate:latest", "--knexfile", "knexfile.ts"],
    {
      cwd: opts.cwd ?? process.cwd(),
      env: { ...process.env, ...opts.env, DATABASE_URL: databaseUrl },
      encoding: "utf8",
    },
  );
  if (r.status !== 0) throw new Error(`migrating ${databaseNameOf(databaseUrl)} failed:\n${r.stdout}\n${r.stderr}`);
}

/**
 * Creates database `name` (utf8mb4) on the server of `adminUrl` (whose user may create databases)
 * and migrates it from zero. Returns its mysql:// URL; a failed migration drops it again.
 */
export async function createMigratedDatabase(
  adminUrl: string,
  name: string,
  opts: { cwd?: string; env?: NodeJS.ProcessEnv } = {},
): Promise<string> {
  const admin = await adminConnection(adminUrl);
  try {
    await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await admin.end();
  }
  const url = databaseUrlFor(adminUrl, name);
  try {
    migrateDatabase(url, opts);
  } catch (err) {
    await dropDatabase(adminUrl, name);
    throw err;
  }
  return url;
}

/** Drops database `name` on the server of `adminUrl` when it exists. */
export async function dropDatabase(adminUrl: string, name: string): Promise<void> {
  const admin = await adminConnection(adminUrl);
  try {
    await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
  } finally {
    await admin.end();
  }
}
