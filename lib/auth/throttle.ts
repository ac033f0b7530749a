import "server-only";
import { db } from "@/lib/db/knex";

/** Failed sign-ins counted within this window, in minutes. */
export const THROTTLE_WINDOW_MIN = 15;
/** Failures for one e-mail address (since its last success) that lock it for the window. */
export const THROTTLE_EMAIL_LIMIT = 5;
/** Failures from one client address that lock it for the window. */
export const THROTTLE_IP_LIMIT = 20;

export type ThrottleVerdict = { allowed: true } | { allowed: false; retryInMinutes: number; message: string };

/** Milliseconds until the oldest of the failures that push the count over the limit leaves the window. */
function waitMs(failures: Date[], limit: number, now: Date): number | null {
  if (failures.length < limit) return null;
  const pivot = failures[failures.length - limit];
  if (!pivot) return null;
  return pivot.getTime() + THROTTLE_WINDOW_MIN * 60_000 - now.getTime();
}

/** Decides whether a sign-in for `email` from `ip` may be tried now. */
export async function checkSignInAllowed(email: string, ip: string): Promise<ThrottleVerdict> {
  const nowRow = (await db.select(db.raw("NOW(3) AS now")).first()) as { now: Date };
  const now = nowRow.now;
  const since = new Date(now.getTime() - THROTTLE_WINDOW_MIN * 60_000);

  const lastSuccess = (await db("sign_in_attempts")
    .where({ email, succeeded: true })
    .andWhere("created_at", ">", since)
    .max({ at: "created_at" })
    .first()) as { at: Date | null } | undefined;
  const emailSince = lastSuccess?.at && lastSuccess.at > since ? lastSuccess.at : since;

  const [byEmail, byIp] = await Promise.all([
    db("sign_in_attempts")
      .where({ email, succeeded: false })
      .andWhere("created_at", ">", emailSince)
      .orderBy("created_at", "asc")
      .pluck("created_at") as Promise<Date[]>,
    db("sign_in_attempts")
      .where({ ip, succeeded: false })
      .andWhere("created_at", ">", since)
      .orderBy("created_at", "asc")
      .pluck("created_at") as Promise<Date[]>,
  ]);

  const waits = [waitMs(byEmail, THROTTLE_EMAIL_LIMIT, now), waitMs(byIp, THROTTLE_IP_LIMIT, now)].filter(
    (w): w is number => w !== null && w > 0,
  );
  if (waits.length === 0) return { allowed: true };
  const retryInMinutes = Math.max(1, Math.ceil(Math.max(...waits) / 60_000));
  return {
    allowed: false,
    retryInMinutes,
    message: `Too many failed sign-ins. Try again in ${retryInMinutes} minute${retryInMinutes === 1 ? "" : "s"}.`,
  };
}

/** Records the outcome of a sign-in attempt that was allowed to run. */
export async function recordSignInAttempt(email: string, ip: string, succeeded: boolean): Promise<void> {
  await db("sign_in_attempts").insert({ email: email.slice(0, 255), ip: ip.slice(0, 64), succeeded });
}
