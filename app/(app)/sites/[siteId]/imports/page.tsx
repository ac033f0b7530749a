import type { Metadata } from "next";
import { roleAtLeast } from "@/lib/auth/roles";
import { env } from "@/lib/env";
import { LabelCaution } from "@/lib/ui/caution";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { ImportHistory } from "@/features/imports/components/import-history";
import { ImportWorkbench } from "@/features/imports/components/import-workbench";
import { RecomputePanel } from "@/features/imports/components/recompute-panel";
import { deleteImportAction, recomputeAction, resolveOverlapAction } from "@/features/imports/server/actions";
import { loadImportPage } from "@/features/imports/server/page-data";

type Props = { params: Promise<{ siteId: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadImportPage((await params).siteId);
  return { title: `Import - ${site.name}` };
}

export default async function ImportPage({ params }: Props) {
  const { site, role, imports, template, span } = await loadImportPage((await params).siteId);
  const canImport = roleAtLeast(role, "analyst");
  const today = new Date().toISOString().slice(0, 10);
  return (
    <>
      <SitePageHeader
        site={site}
        title="Import"
        description={
          canImport
            ? "Bring half-hourly tower data into this site. Every original file is kept; an import lands whole or not at all, and the evenings it touches are classified."
            : "Files imported into this site. Analysts and leads can import; you can read the reports."
        }
      />
      <SiteTabs siteId={site.id} />
      <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,1fr)]">
        <div className="min-w-0 space-y-8">
          {canImport ? (
            <section aria-labelledby="new-import" className="card p-5">
              <h2 id="new-import" className="mb-4 text-sm font-semibold tracking-wide text-ink-muted uppercase">
                New import
              </h2>
              <ImportWorkbench siteId={site.id} siteUtcOffsetHours={site.utc_offset_hours} template={template} maxBytes={env.IMPORT_MAX_BYTES} resolveOverlap={resolveOverlapAction} />
            </section>
          ) : null}
          <section aria-labelledby="history" className="space-y-3">
            <h2 id="history" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
              History
            </h2>
            <ImportHistory siteId={site.id} imports={imports} canDelete={canImport} canPurge={roleAtLeast(role, "lead")} deleteImport={deleteImportAction} />
          </section>
        </div>
        <aside className="space-y-6">
          {canImport ? (
            <section aria-labelledby="recompute" className="card p-5">
              <h2 id="recompute" className="mb-1 text-sm font-semibold tracking-wide text-ink-muted uppercase">
                Recompute evenings
              </h2>
              <p className="mb-3 text-xs text-ink-muted">Classify a period again with the site&apos;s active rule set. Overridden labels stay as they are.</p>
              <RecomputePanel siteId={site.id} defaultFrom={span?.from ?? today} defaultTo={span?.to ?? today} action={recomputeAction} />
            </section>
          ) : null}
          <section aria-labelledby="format" className="card space-y-2 p-5 text-sm">
            <h2 id="format" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
              What files work
            </h2>
            <p className="text-ink-muted">
              CSV (comma, semicolon or tab) with a header row naming a timestamp column (TIMESTAMP_START / TIMESTAMP_END as YYYYMMDDHHMM, or ISO 8601), one column per variable, units in a second header row or in the names.
            </p>
            <p className="text-ink-muted">Values outside physical ranges and cells that are not numbers become missing and are listed in the report.</p>
          </section>
          <LabelCaution />
        </aside>
      </div>
    </>
  );
}
