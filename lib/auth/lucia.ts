import "server-only";
import { Mysql2Adapter } from "@lucia-auth/adapter-mysql";
import { Lucia, TimeSpan } from "lucia";
import { env } from "@/lib/env";
import { mysqlPool } from "@/lib/db/knex";

export const SESSION_COOKIE = "gloaming_session";

export const lucia = new Lucia(new Mysql2Adapter(mysqlPool(), { user: "users", session: "user_sessions" }), {
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
