"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { getCurrentSession } from "@/lib/auth/session";
import { preferencesSchema, type PreferencesState } from "@/features/notices/schemas";
import { saveNoticePreferences } from "@/features/notices/server/preferences";

/** Saves the signed-in person's notice settings. */
export async function savePreferencesAction(_prev: PreferencesState, formData: FormData): Promise<PreferencesState> {
  const current = await getCurrentSession();
  if (!current) redirect("/sign-in");
  const prefs = preferencesSchema.parse({ importNotices: formData.get("importNotices"), weeklyDigest: formData.get("weeklyDigest") });
  await saveNoticePreferences(current.user.id, prefs);
  revalidatePath("/settings");
  return { ok: true, message: "Settings saved." };
}
