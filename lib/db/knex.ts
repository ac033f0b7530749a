import "server-only";
import knex, { type Knex } from "knex";
import { createPool, type Pool } from "mysql2/promise";
import { UTC_SESSION_SQL, connectionOptions } from "@/lib/db/connection";

type Conn = { query: (sql: string, cb: (err: Error | null) => void) => void };

/** Knex configuration for the app's database; shared with knexfile.ts. */
export function knexConfig(url?: string): Knex.Config {
  return {
    client: "mysql2",
    connection: connectionOptions(url),
    pool: {
      min: 0,
      max: 10,
      afterCreate: (conn: Conn, done: (err: Error | null, conn: Conn) => void) => {
        conn.query(UTC_SESSION_SQL, (err) => done(err, conn));
      },
    },
  };
}

// One pool per process: Next dev re-evaluates modules on every change.
const globalForDb = globalThis as unknown as { gloamingKnex?: Knex; gloamingPool?: Pool };

export const db: Knex = globalForDb.gloamingKnex ?? knex(knexConfig());
globalForDb.gloamingKnex = db;

/** A mysql2/promise pool on the same database, for lucia's adapter and compiled reads (lib/db/compiled.ts). */
export function mysqlPool(): Pool {
  if (!globalForDb.gloamingPool) {
    const pool = createPool({ ...connectionOptions(), connectionLimit: 10 });
    pool.on("connection", (conn) => {
      void conn.query(UTC_SESSION_SQL);
    });
    globalForDb.gloamingPool = pool;
  }
  return globalForDb.gloamingPool;
}

/** Closes both pools (scripts and tests; the app keeps them for its lifetime). */
export async function closeDb(): Promise<void> {
  const pool = globalForDb.gloamingPool;
  globalForDb.gloamingPool = undefined;
  await Promise.all([db.destroy(), pool?.end()]);
}
