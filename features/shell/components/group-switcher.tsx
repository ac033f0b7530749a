"use client";

import type { Membership } from "@/lib/auth/session";
import { useDisclosure } from "@/features/shell/components/use-disclosure";
import { switchGroupAction } from "@/features/shell/server/actions";

const ROLE_WORD = { lead: "lead", analyst: "analyst", viewer: "viewer" } as const;

/** Shows the active group and lets a member of several groups change it. */
export function GroupSwitcher({ memberships, active }: { memberships: Membership[]; active: Membership }) {
  const { open, buttonProps, panelProps } = useDisclosure();
  const several = memberships.length > 1;

  const summary = (
    <span className="min-w-0 text-left">
      <span className="block text-[11px] font-medium tracking-wide text-ink-muted uppercase">Group</span>
      <span className="line-clamp-2 block text-sm font-semibold text-ink">{active.groupName}</span>
      <span className="block text-xs text-ink-muted">your role: {ROLE_WORD[active.role]}</span>
    </span>
  );

  if (!several) return <div className="rounded-lg border border-line px-3 py-2">{summary}</div>;

  return (
    <div className="relative">
      <button
        type="button"
        {...buttonProps}
        className="flex w-full items-center justify-between gap-2 rounded-lg border border-line px-3 py-2 hover:bg-surface-sunken"
      >
        {summary}
        {/* named by its visible text first (axe label-content-name-mismatch) */}
        <span className="sr-only">, switch group</span>
        <span
          aria-hidden="true"
          className={`text-ink-muted transition-transform ${open ? "rotate-180" : ""}`}
        >
          ▾
        </span>
      </button>
      <div
        {...panelProps}
        className="absolute inset-x-0 top-full z-30 mt-1 rounded-lg border border-line bg-surface-raised p-1 shadow-lg"
      >
        <form action={switchGroupAction}>
          <ul aria-label="Your groups">
            {memberships.map((m) => {
              const isActive = m.groupId === active.groupId;
              return (
                <li key={m.groupId}>
                  <button
                    type="submit"
                    name="groupId"
                    value={m.groupId}
                    aria-current={isActive ? "true" : undefined}
                    className="flex w-full items-center justify-between gap-2 rounded-md px-2.5 py-2 text-left text-sm hover:bg-surface-sunken"
                  >
                    <span className="truncate">{m.groupName}</span>
                    <span className="shrink-0 text-xs text-ink-muted">
                      {isActive ? "✓ " : ""}
                      {ROLE_WORD[m.role]}
                    </span>
                  </button>
                </li>
              );
            })}
          </ul>
        </form>
      </div>
    </div>
  );
}
