import type { Metadata } from "next";
import Link from "next/link";
import { getActiveGroup } from "@/lib/auth/session";
import { roleAtLeast } from "@/lib/auth/roles";
import { FormMessage } from "@/lib/ui/field";
import { PageHeader } from "@/lib/ui/page-header";
import { SiteForm } from "@/features/sites/components/site-form";
import { createSiteAction } from "@/features/sites/server/actions";

export const metadata: Metadata = { title: "New site" };

export default async function NewSitePage() {
  const active = await getActiveGroup();
  return (
    <>
      <PageHeader
        eyebrow={
          <Link href="/sites" className="hover:underline">
            ← Sites
          </Link>
        }
        title="New site"
        description={active ? `A tower of ${active.groupName}.` : undefined}
      />
      <div className="max-w-3xl card p-6">
        {active && roleAtLeast(active.role, "lead") ? (
          <SiteForm
            action={createSiteAction}
            groupId={active.groupId}
            submitLabel="Create site"
            cancelHref="/sites"
          />
        ) : (
          <FormMessage tone="info">Only a lead of the group can add sites.</FormMessage>
        )}
      </div>
    </>
  );
}
