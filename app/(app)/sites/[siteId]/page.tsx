import type { Metadata } from "next";
import Link from "next/link";
import { roleAtLeast } from "@/lib/auth/roles";
import { PageHeader } from "@/lib/ui/page-header";
import { DeleteSite } from "@/features/sites/components/delete-site";
import { SiteFacts } from "@/features/sites/components/site-facts";
import { deleteSiteAction } from "@/features/sites/server/actions";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { loadSiteForPage } from "@/features/sites/server/page-data";

type Props = { params: Promise<{ siteId: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadSiteForPage((await params).siteId);
  return { title: site.name };
}

export default async function SitePage({ params }: Props) {
  const { site, role } = await loadSiteForPage((await params).siteId);
  const canManage = roleAtLeast(role, "lead");
  return (
    <>
      <PageHeader
        eyebrow={
          <Link href="/sites" className="hover:underline">
            ← Sites
          </Link>
        }
        title={site.name}
        actions={
          <>
            <Link href={`/sites/${site.id}/imports`} className={roleAtLeast(role, "analyst") ? "btn-primary" : "btn-quiet"}>
              {roleAtLeast(role, "analyst") ? "Import data" : "Imports"}
            </Link>
            {canManage ? (
              <>
                <Link href={`/sites/${site.id}/edit`} className="btn-quiet">
                  Edit
                </Link>
                <DeleteSite siteId={site.id} siteName={site.name} action={deleteSiteAction} />
              </>
            ) : null}
          </>
        }
      />
      <SiteTabs siteId={site.id} />
      <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <section aria-labelledby="setup-title" className="card p-5">
          <h2 id="setup-title" className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase">
            Tower set-up
          </h2>
          <SiteFacts site={site} />
        </section>
        <div className="space-y-6">
          <section aria-labelledby="data-title" className="card p-5">
            <h2 id="data-title" className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Data
            </h2>
            <p className="text-sm text-ink-muted italic">No data yet.</p>
          </section>
          {site.notes ? (
            <section aria-labelledby="notes-title" className="card p-5">
              <h2
                id="notes-title"
                className="mb-2 text-sm font-semibold tracking-wide text-ink-muted uppercase"
              >
                Notes
              </h2>
              <p className="text-sm whitespace-pre-line">{site.notes}</p>
            </section>
          ) : null}
        </div>
      </div>
    </>
  );
}
