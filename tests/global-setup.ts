/*
 * Once per `vitest run`: makes sure the database server answers, creates a fresh database
 * for this run, migrates it from zero with the stock knex CLI and drops it afterwards.
 */
import { randomBytes } from "node:crypto";
import { createConnection } from "mysql2/promise";
import type { TestProject } from "vitest/node";
import { connectionOptions } from "@/lib/db/connection";
import { env } from "@/lib/env";
import { startDatabase } from "@/scripts/db";
import { startMailCatcher } from "@/lib/mail/catcher";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/database";
import path from "node:path";

declare module "vitest" {
  export interface ProvidedContext {
    /** mysql:// URL of this run's database */
    databaseUrl: string;
    /** unique id of this test run (used to build the app once per run) */
    testRunId: string;
    /** port of this run's local SMTP catcher on 127.0.0.1 */
    mailCatcherPort: number;
    /** directory where this run's catcher stores messages */
    mailDir: string;
  }
}

const STALE_HOURS = 6;

export default async function setup(project: TestProject) {
  await startDatabase();
  const base = new URL(env.DATABASE_URL);
  const baseName = decodeURIComponent(base.pathname.slice(1)) || "gloaming";
  const runId = randomBytes(4).toString("hex");
  const name = `${baseName}_test_${runId}`;

  const admin = await createConnection({ ...connectionOptions(env.DATABASE_URL), database: undefined });
  // Leftovers of interrupted runs.
  const [stale] = (await admin.query(
    `SELECT table_schema AS name FROM information_schema.tables
      WHERE table_schema LIKE ? GROUP BY table_schema
     HAVING MIN(create_time) < NOW() - INTERVAL ${STALE_HOURS} HOUR`,
    [`${baseName.replace(/_/g, "\\_")}\\_test\\_%`],
  )) as unknown as [Array<{ name: string }>];
  for (const s of stale) await admin.query(`DROP DATABASE IF EXISTS \`${s.name}\``);
  await admin.end();
  const databaseUrl = await createMigratedDatabase(env.DATABASE_URL, name, { cwd: project.config.root });

  project.provide("databaseUrl", databaseUrl);
  project.provide("testRunId", runId);

  const catcher = await startMailCatcher({ dir: path.join(project.config.root, "test-results", "mail", runId), port: 0 });
  project.provide("mailCatcherPort", catcher.port);
  project.provide("mailDir", catcher.dir);

  return async () => {
    await catcher.close();
    await dropDatabase(env.DATABASE_URL, name);
  };
}
