import "server-only";
import { Mysql2Adapter } from "@lucia-auth/adapter-mysql";
import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser } from "lucia";
import type { Pool, RowDataPacket } from "mysql2/promise";
import { env } from "@/lib/env";
import { mysqlPool } from "@/lib/db/knex";

export const SESSION_COOKIE = "gloaming_session";

type SessionUserRow = RowDataPacket & { id: string; user_id: string; expires_at: Date; email: string; display_name: string };

/**
 * lucia's MySQL adapter, with the check that runs on every signed-in request done in one round
 * trip (a prepared statement): the stock adapter reads the session and its user with two
 * queries. Everything else (creating, extending and deleting sessions) is the stock adapter's.
 */
export class SessionAdapter extends Mysql2Adapter {
  constructor(private readonly pool: Pool) {
    super(pool, { user: "users", session: "user_sessions" });
  }

  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const [rows] = await this.pool.execute<SessionUserRow[]>(
      "SELECT s.id, s.user_id, s.expires_at, u.email, u.display_name FROM user_sessions s JOIN users u ON u.id = s.user_id WHERE s.id = ?",
      [sessionId],
    );
    const row = rows[0];
    if (!row) return [null, null];
    return [
      { id: row.id, userId: row.user_id, expiresAt: row.expires_at instanceof Date ? row.expires_at : new Date(`${String(row.expires_at)} GMT`), attributes: {} },
      { id: row.user_id, attributes: { email: row.email, display_name: row.display_name } },
    ];
  }
}

export const lucia = new Lucia(new SessionAdapter(mysqlPool()), {
  sessionExpiresIn: new TimeSpan(30, "d"),
  sessionCookie: {
    name: SESSION_COOKIE,
    expires: true,
    // lucia always sets HttpOnly; Secure only where the app is served over https.
    attributes: { sameSite: "lax", secure: env.SESSION_SECURE, path: "/" },
  },
  getUserAttributes: (row) => ({ email: row.email, displayName: row.display_name }),
});

declare module "lucia" {
  interface Register {
    Lucia: typeof lucia;
    DatabaseUserAttributes: { email: string; display_name: string };
  }
}
