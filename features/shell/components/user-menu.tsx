"use client";

import type { SessionUser } from "@/lib/auth/session";
import { useDisclosure } from "@/features/shell/components/use-disclosure";

function initials(name: string): string {
  // Words that start with a letter only: "Demo Analyst (invented)" gives "DA".
  const words = name.split(/\s+/).filter((w) => /^\p{L}/u.test(w));
  const letters = words.length > 1 ? [words[0], words[1]] : [words[0] ?? name];
  return letters
    .map((w) => (w ?? "").charAt(0))
    .join("")
    .toUpperCase();
}

/** The signed-in person and sign out; `signOutAction` comes from the app layer. */
export function UserMenu({
  user,
  signOutAction,
  placement = "down",
}: {
  user: SessionUser;
  signOutAction: () => Promise<void>;
  placement?: "up" | "down";
}) {
  const { buttonProps, panelProps } = useDisclosure();
  return (
    <div className="relative">
      <button
        type="button"
        {...buttonProps}
        className="flex w-full items-center gap-2.5 rounded-lg px-2 py-1.5 text-left hover:bg-surface-sunken"
      >
        <span
          aria-hidden="true"
          className="grid size-8 shrink-0 place-items-center rounded-full bg-dusk-600 text-xs font-semibold text-white dark:bg-dusk-300 dark:text-dusk-950"
        >
          {initials(user.displayName)}
        </span>
        {/* The name comes from the visible text (axe label-content-name-mismatch): on narrow
            screens, where only the initials show, the same words stay for screen readers. */}
        <span className="sr-only min-w-0 sm:not-sr-only sm:block">
          <span className="block truncate text-sm font-medium text-ink">{user.displayName}</span>
          <span className="block truncate text-xs text-ink-muted">{user.email}</span>
        </span>
        <span className="sr-only">, your account</span>
      </button>
      <div
        {...panelProps}
        className={`absolute right-0 z-30 w-64 rounded-lg border border-line bg-surface-raised p-1 shadow-lg ${
          placement === "up" ? "bottom-full mb-1" : "top-full mt-1"
        }`}
      >
        <div className="px-3 py-2 sm:hidden">
          <p className="truncate text-sm font-medium">{user.displayName}</p>
          <p className="truncate text-xs text-ink-muted">{user.email}</p>
        </div>
        <form action={signOutAction}>
          <button
            type="submit"
            className="w-full rounded-md px-3 py-2 text-left text-sm hover:bg-surface-sunken"
          >
            Sign out
          </button>
        </form>
      </div>
    </div>
  );
}
