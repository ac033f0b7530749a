import { redirect } from "next/navigation";
import type { ReactNode } from "react";
import { getActiveGroup, getCurrentSession, listMemberships } from "@/lib/auth/session";
import { signOut } from "@/features/auth/server/actions";
import { AppShell } from "@/features/shell/components/app-shell";

// A guard for the frame only: every page, action and handler still checks the role itself.
export default async function SignedInLayout({ children }: { children: ReactNode }) {
  const current = await getCurrentSession();
  if (!current) redirect("/sign-in");
  const [memberships, active] = await Promise.all([listMemberships(current.user.id), getActiveGroup()]);
  return (
    <AppShell user={current.user} memberships={memberships} active={active} signOutAction={signOut}>
      {children}
    </AppShell>
  );
}
