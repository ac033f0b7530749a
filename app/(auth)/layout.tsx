import { redirect } from "next/navigation";
import type { ReactNode } from "react";
import { getCurrentSession } from "@/lib/auth/session";
import { LabelCaution } from "@/lib/ui/caution";
import { Brand } from "@/features/shell/components/brand";

export default async function AuthLayout({ children }: { children: ReactNode }) {
  if (await getCurrentSession()) redirect("/sites");
  return (
    <div className="relative flex min-h-dvh flex-col items-center justify-center overflow-hidden px-4 py-10">
      {/* A dusk sky behind the card: purely decorative. */}
      <div
        aria-hidden="true"
        className="pointer-events-none absolute inset-x-0 bottom-0 h-2/5 bg-gradient-to-t from-[#d08a1e]/15 via-dusk-300/10 to-transparent dark:from-[#d08a1e]/10 dark:via-dusk-700/20"
      />
      <main id="main" className="relative w-full max-w-md">
        <div className="mb-6 flex justify-center">
          <Brand href="/sign-in" />
        </div>
        <div className="card p-6 sm:p-8">{children}</div>
        <LabelCaution className="mt-6 px-1" />
      </main>
    </div>
  );
}
