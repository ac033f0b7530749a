import type { Metadata } from "next";
import { roleAtLeast } from "@/lib/auth/roles";
import { FormMessage } from "@/lib/ui/field";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { SiteForm } from "@/features/sites/components/site-form";
import { updateSiteAction } from "@/features/sites/server/actions";
import { loadSiteForPage } from "@/features/sites/server/page-data";

export const metadata: Metadata = { title: "Edit site" };

export default async function EditSitePage({ params }: { params: Promise<{ siteId: string }> }) {
  const { site, role } = await loadSiteForPage((await params).siteId);
  const back = `/sites/${site.id}`;
  return (
    <>
      <SitePageHeader site={site} title="Edit site" />
      <div className="max-w-3xl card p-6">
        {roleAtLeast(role, "lead") ? (
          <SiteForm
            action={updateSiteAction.bind(null, site.id)}
            site={site}
            submitLabel="Save changes"
            cancelHref={back}
          />
        ) : (
          <FormMessage tone="info">Only a lead of this group can edit its sites.</FormMessage>
        )}
      </div>
    </>
  );
}
