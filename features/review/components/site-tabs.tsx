"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

/** The per-site sub-navigation of the review screens. */
export function SiteTabs({ siteId }: { siteId: number }) {
  const pathname = usePathname();
  const tabs = [
    { href: `/sites/${siteId}`, label: "Overview", exact: true },
    { href: `/sites/${siteId}/calendar`, label: "Calendar" },
    { href: `/sites/${siteId}/review`, label: "Review queue" },
    { href: `/sites/${siteId}/regime`, label: "Regime" },
    { href: `/sites/${siteId}/anomalies`, label: "Anomalies" },
  ];
  return (
    <nav aria-label="Site" className="-mt-4 mb-6 border-b border-line">
      <ul className="-mb-px flex gap-1 overflow-x-auto">
        {tabs.map((t) => {
          const current = t.exact ? pathname === t.href : pathname.startsWith(t.href) || (t.label === "Calendar" && pathname.includes("/evenings/"));
          return (
            <li key={t.href}>
              <Link
                href={t.href}
                aria-current={current ? "page" : undefined}
                className={`inline-block border-b-2 px-3 py-2 text-sm font-medium whitespace-nowrap ${
                  current ? "border-dusk-600 text-ink dark:border-dusk-300" : "border-transparent text-ink-muted hover:border-line hover:text-ink"
                }`}
              >
                {t.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
