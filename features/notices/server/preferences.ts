import "server-only";
import { db } from "@/lib/db/knex";
import { DEFAULT_PREFERENCES, type NoticePreferences } from "@/features/notices/schemas";

/** A person's notice settings (defaults when never changed). */
export async function getNoticePreferences(userId: string): Promise<NoticePreferences> {
  const row = (await db("notification_preferences").where({ user_id: userId }).first()) as
    | { import_notices: number | boolean; weekly_digest: number | boolean }
    | undefined;
  if (!row) return { ...DEFAULT_PREFERENCES };
  return { importNotices: Boolean(row.import_notices), weeklyDigest: Boolean(row.weekly_digest) };
}

/** Stores a person's notice settings. */
export async function saveNoticePreferences(userId: string, prefs: NoticePreferences): Promise<void> {
  await db("notification_preferences")
    .insert({ user_id: userId, import_notices: prefs.importNotices, weekly_digest: prefs.weeklyDigest })
    .onConflict("user_id")
    .merge(["import_notices", "weekly_digest"]);
}
