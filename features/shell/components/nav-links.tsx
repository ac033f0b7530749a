"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { roleAtLeast, type Role } from "@/lib/auth/roles";
import { NAV_ITEMS } from "@/features/shell/nav";

/** The main navigation; the current section is marked with aria-current and a bar. */
export function NavLinks({ role }: { role: Role | null }) {
  const pathname = usePathname();
  const items = NAV_ITEMS.filter(
    (i) => !i.minimumRole || (role !== null && roleAtLeast(role, i.minimumRole)),
  );
  return (
    <ul className="space-y-1">
      {items.map((item) => {
        const current = pathname === item.href || pathname.startsWith(`${item.href}/`);
        return (
          <li key={item.href}>
            <Link
              href={item.href}
              aria-current={current ? "page" : undefined}
              className={`flex items-center gap-3 rounded-lg px-3 py-2 text-sm font-medium transition-colors ${
                current
                  ? "bg-dusk-100 text-dusk-900 shadow-[inset_3px_0_0_var(--color-dusk-600)] dark:bg-dusk-800 dark:text-white dark:shadow-[inset_3px_0_0_var(--color-dusk-300)]"
                  : "text-ink-muted hover:bg-surface-sunken hover:text-ink"
              }`}
            >
              <span aria-hidden="true" className="w-4 text-center font-mono">
                {item.glyph}
              </span>
              {item.label}
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
