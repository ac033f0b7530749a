import type { Metadata } from "next";
import { requireSession } from "@/lib/auth/session";
import { PageHeader } from "@/lib/ui/page-header";
import { PreferencesForm } from "@/features/notices/components/preferences-form";
import { savePreferencesAction } from "@/features/notices/server/actions";
import { getNoticePreferences } from "@/features/notices/server/preferences";

export const metadata: Metadata = { title: "Settings" };

export default async function SettingsPage() {
  const { user } = await requireSession();
  const prefs = await getNoticePreferences(user.id);
  return (
    <>
      <PageHeader title="Settings" eyebrow={user.email} description="Which messages Gloaming sends you by e-mail." />
      <section className="card max-w-2xl p-5">
        <PreferencesForm initial={prefs} action={savePreferencesAction} />
      </section>
    </>
  );
}
