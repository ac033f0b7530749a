"use client";

import { useActionState } from "react";
import { FormMessage } from "@/lib/ui/field";
import type { NoticePreferences, PreferencesState } from "@/features/notices/schemas";

type Props = {
  initial: NoticePreferences;
  action: (prev: PreferencesState, formData: FormData) => Promise<PreferencesState>;
};

/** The person's e-mail notice settings. */
export function PreferencesForm({ initial, action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  return (
    <form action={formAction} className="space-y-4">
      <FormMessage tone="info">{state.message}</FormMessage>
      <label className="flex items-start gap-3 text-sm">
        <input type="checkbox" name="importNotices" defaultChecked={initial.importNotices} className="mt-1" />
        <span>
          <span className="block font-medium">Import notices</span>
          <span className="block text-ink-muted">A message when an import you started has finished or failed.</span>
        </span>
      </label>
      <label className="flex items-start gap-3 text-sm">
        <input type="checkbox" name="weeklyDigest" defaultChecked={initial.weeklyDigest} className="mt-1" />
        <span>
          <span className="block font-medium">Weekly digest</span>
          <span className="block text-ink-muted">
            Every Monday: label counts and anomalies per site of your groups for the week before.
          </span>
        </span>
      </label>
      <button type="submit" className="btn-primary" disabled={pending}>
        {pending ? "Saving…" : "Save settings"}
      </button>
    </form>
  );
}
