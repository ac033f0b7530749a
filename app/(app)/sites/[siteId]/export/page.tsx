import type { Metadata } from "next";
import { LabelCaution } from "@/lib/ui/caution";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { eveningExtent } from "@/features/seasons/server/queries";
import { ExportForm } from "@/features/exports/components/export-form";

export const metadata: Metadata = { title: "Export" };

type Props = { params: Promise<{ siteId: string }> };

export default async function ExportPage({ params }: Props) {
  const { site } = await loadSiteForPage((await params).siteId);
  const extent = await eveningExtent([site.id]);
  return (
    <>
      <SitePageHeader
        site={site}
        title="Export tagged evenings"
        description="One zip for a paper or a script: the evenings with their labels and metrics as CSV, optionally every half-hour with its evening's label, and a provenance file that says how the labels came about."
      />
      <div className="max-w-2xl space-y-6">
        <LabelCaution />
        <ExportForm siteId={site.id} from={extent.from} to={extent.to} />
      </div>
    </>
  );
}
