import { z } from "zod";

// An unticked checkbox sends nothing; a ticked one sends "on" (or the value attribute).
const checkbox = z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean());

export const preferencesSchema = z.object({ importNotices: checkbox, weeklyDigest: checkbox });

export type NoticePreferences = z.infer<typeof preferencesSchema>;

/** Without a stored row a person gets import notices but no digest. */
export const DEFAULT_PREFERENCES: NoticePreferences = { importNotices: true, weeklyDigest: false };

export type PreferencesState = { ok: boolean; message?: string };
