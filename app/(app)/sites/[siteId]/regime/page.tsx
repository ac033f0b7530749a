import type { Metadata } from "next";
import { LabelCaution } from "@/lib/ui/caution";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { RegimeChart } from "@/features/review/components/regime-chart";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { getRegimePoints } from "@/features/review/server/queries";

type Props = { params: Promise<{ siteId: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadSiteForPage((await params).siteId);
  return { title: `Regime · ${site.name}` };
}

export default async function RegimePage({ params }: Props) {
  const { site } = await loadSiteForPage((await params).siteId);
  const points = await getRegimePoints(site.id);
  return (
    <>
      <SitePageHeader
        site={site}
        title="Turbulence against wind speed"
        description="Each mark is one evening: σw against the mean wind speed of its evening window. Below a threshold speed turbulence stays weak; above it, it grows with the wind."
      />
      <SiteTabs siteId={site.id} />
      <LabelCaution className="mb-5" />
      <section className="card p-5">
        {points.length ? <RegimeChart points={points} /> : <p className="text-sm text-ink-muted">No classified evenings with σw and wind speed yet.</p>}
      </section>
    </>
  );
}
