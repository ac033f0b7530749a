import "server-only";
import { hashLinkToken, isLinkTokenShape, newLinkToken } from "@/lib/auth/link-token";
import { hashPassword } from "@/lib/auth/password";
import { recordAudit } from "@/lib/db/audit";
import { db } from "@/lib/db/knex";
import { queueMail } from "@/lib/mail/outbox";
import { appLink } from "@/lib/mail/transport";

/** A reset link works for this long, in ms. */
export const RESET_TTL_MS = 60 * 60_000;
/** At most this many reset mails per account per hour; more requests are answered but not sent. */
export const RESETS_PER_HOUR = 3;

/**
 * Queues a reset link for `email` when it has an account. The caller shows the same answer
 * either way, so the form cannot be used to find out who has an account.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  const user = await db("users").where({ email }).first<{ id: string; display_name: string } | undefined>("id", "display_name");
  if (!user) return;
  await db.transaction(async (trx) => {
    // The lock serialises requests of one account, so the hourly limit holds under parallel requests.
    await trx("users").where({ id: user.id }).forUpdate().first("id");
    const recent = (await trx("password_resets")
      .where({ user_id: user.id })
      .andWhere("created_at", ">", new Date(Date.now() - 60 * 60_000))
      .count({ n: "*" })
      .first()) as { n: number | string };
    if (Number(recent.n) >= RESETS_PER_HOUR) return;
    const { token, hash } = newLinkToken();
    const expiresAt = new Date(Date.now() + RESET_TTL_MS);
    await trx("password_resets").insert({ user_id: user.id, token_hash: hash, expires_at: expiresAt });
    await queueMail(
      {
        kind: "password_reset",
        to: email,
        subject: "Reset your Gloaming password",
        text: [
          `Hello ${user.display_name},`,
          "",
          "Someone (hopefully you) asked to reset the password of your Gloaming account. Choose a new one here:",
          appLink(`/reset-password/${token}`),
          "",
          `The link works once and expires at ${expiresAt.toUTCString()}. Resetting signs out every other session of your account.`,
          "If you did not ask for this, ignore this message; your password stays as it is.",
        ].join("\n"),
      },
      trx,
    );
  });
}

type ResetRow = { id: number; user_id: string; expires_at: Date; used_at: Date | null };

/** True when `token` names an unused, unexpired reset link. */
export async function isResetTokenUsable(token: string): Promise<boolean> {
  if (!isLinkTokenShape(token)) return false;
  const row = (await db("password_resets").where({ token_hash: hashLinkToken(token) }).first()) as ResetRow | undefined;
  return Boolean(row && !row.used_at && row.expires_at.getTime() > Date.now());
}

/**
 * Sets a new password through a reset link and ends every session of the person (the caller
 * then starts a new one for this browser). Returns the user id, or null when the link is
 * unknown, used or expired.
 */
export async function resetPassword(token: string, password: string): Promise<string | null> {
  if (!isLinkTokenShape(token)) return null;
  const tokenHash = hashLinkToken(token);
  const passwordHash = await hashPassword(password);
  return db.transaction(async (trx) => {
    const row = (await trx("password_resets").where({ token_hash: tokenHash }).forUpdate().first()) as ResetRow | undefined;
    if (!row || row.used_at || row.expires_at.getTime() <= Date.now()) return null;
    const now = new Date();
    await trx("users").where({ id: row.user_id }).update({ password_hash: passwordHash });
    // This link and any other open link of the person are spent.
    await trx("password_resets").where({ user_id: row.user_id }).whereNull("used_at").update({ used_at: now });
    await trx("user_sessions").where({ user_id: row.user_id }).delete();
    await recordAudit(
      { groupId: null, userId: row.user_id, action: "user.password_reset", entityType: "user", entityId: row.user_id },
      trx,
    );
    return row.user_id;
  });
}
