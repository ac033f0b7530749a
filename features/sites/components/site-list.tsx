"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { LabelCaution } from "@/lib/ui/caution";
import { SiteCard } from "@/features/sites/components/site-card";
import { sitesListOptions } from "@/features/sites/queries";

/**
 * The group's sites. The page hydrates the query on the server, so the list renders at once
 * and refetches from GET /api/sites when it goes stale or after a site changes.
 */
export function SiteList({ groupId, canManage }: { groupId: number; canManage: boolean }) {
  const { data: sites, error, isPending } = useQuery(sitesListOptions(groupId));

  if (isPending) return <p className="text-sm text-ink-muted">Loading sites…</p>;
  if (error) {
    return (
      <p role="alert" className="text-sm text-red-700 dark:text-red-300">
        The site list could not be loaded: {error.message}
      </p>
    );
  }
  if (sites.length === 0) {
    return (
      <div className="flex flex-col items-start gap-3 card p-8">
        <h2 className="text-base font-semibold">No sites yet</h2>
        <p className="max-w-prose text-sm text-ink-muted">
          A site holds a tower&apos;s coordinates, heights and data clock. Evenings are labelled per site once
          its data is imported.
        </p>
        {canManage ? (
          <Link href="/sites/new" className="btn-primary">
            Add the first site
          </Link>
        ) : (
          <p className="text-sm text-ink-muted">A lead of this group can add sites.</p>
        )}
      </div>
    );
  }
  return (
    <div className="space-y-4">
      <ul className="grid gap-4 lg:grid-cols-2 2xl:grid-cols-3" aria-label="Sites">
        {sites.map((s) => (
          <li key={s.id} className="grid">
            <SiteCard site={s} />
          </li>
        ))}
      </ul>
      {sites.some((s) => s.labelCounts) ? <LabelCaution /> : null}
    </div>
  );
}
