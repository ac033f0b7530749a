import type { ReactNode } from "react";
import type { Membership, SessionUser } from "@/lib/auth/session";
import { LabelCaution } from "@/lib/ui/caution";
import { Brand } from "@/features/shell/components/brand";
import { GroupSwitcher } from "@/features/shell/components/group-switcher";
import { MobileNav } from "@/features/shell/components/mobile-nav";
import { NavLinks } from "@/features/shell/components/nav-links";
import { UserMenu } from "@/features/shell/components/user-menu";

type Props = {
  user: SessionUser;
  memberships: Membership[];
  active: Membership | null;
  signOutAction: () => Promise<void>;
  children: ReactNode;
};

/**
 * The signed-in frame: a sidebar from md up, a top bar with a menu below that.
 * Sign out is passed in by the app layer because features do not import each other.
 */
export function AppShell({ user, memberships, active, signOutAction, children }: Props) {
  const groupBlock = active ? <GroupSwitcher memberships={memberships} active={active} /> : null;
  const nav = (
    <nav aria-label="Main">
      <NavLinks role={active?.role ?? null} />
    </nav>
  );

  return (
    <div className="min-h-dvh md:grid md:grid-cols-[15.5rem_1fr]">
      <a
        href="#main"
        className="sr-only rounded-lg bg-dusk-700 px-3 py-2 text-sm font-medium text-white focus:not-sr-only focus:fixed focus:top-2 focus:left-2 focus:z-50"
      >
        Skip to content
      </a>

      <aside className="sticky top-0 hidden h-dvh flex-col gap-6 border-r border-line bg-surface-raised px-4 py-5 md:flex">
        <Brand href="/sites" />
        {groupBlock}
        {nav}
        <div className="mt-auto border-t border-line pt-3">
          <UserMenu user={user} signOutAction={signOutAction} placement="up" />
        </div>
      </aside>

      <div className="flex min-w-0 flex-col">
        <header className="relative flex items-center justify-between gap-3 border-b border-line bg-surface-raised px-4 py-3 md:hidden">
          <div className="flex items-center gap-2">
            <MobileNav>
              <div className="space-y-4">
                {groupBlock}
                {nav}
              </div>
            </MobileNav>
            <Brand href="/sites" />
          </div>
          <UserMenu user={user} signOutAction={signOutAction} />
        </header>

        <main id="main" tabIndex={-1} className="flex-1 px-4 py-6 outline-none sm:px-8 sm:py-8">
          <div className="mx-auto max-w-6xl">{children}</div>
        </main>

        <footer className="border-t border-line px-4 py-4 sm:px-8">
          <div className="mx-auto max-w-6xl">
            <LabelCaution />
          </div>
        </footer>
      </div>
    </div>
  );
}
