import type { Metadata } from "next";
import Link from "next/link";
import { LabelCaution } from "@/lib/ui/caution";
import {
  anomalyCountsByLabel,
  anomalySeriesOfSite,
  listAnomalies,
  ustarThresholdsForSite,
  weakTurbulenceForSite,
} from "@/lib/anomalies/server/queries";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { anomalyFiltersSchema, type AnomalyFiltersInput } from "@/features/anomalies/schemas";
import { AnomalyFilters } from "@/features/anomalies/components/anomaly-filters";
import {
  AnomalyTable,
  LabelCounts,
  UstarTable,
  WeakTurbulenceTable,
} from "@/features/anomalies/components/anomaly-tables";

type Props = {
  params: Promise<{ siteId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

const PAGE_SIZE = 100;

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadSiteForPage((await params).siteId);
  return { title: `Anomalies · ${site.name}` };
}

function first(v: string | string[] | undefined): string | undefined {
  return Array.isArray(v) ? v[0] : v;
}

export default async function AnomaliesPage({ params, searchParams }: Props) {
  const { site } = await loadSiteForPage((await params).siteId);
  const raw = await searchParams;
  const parsed = anomalyFiltersSchema.safeParse({
    series: first(raw.series),
    kind: first(raw.kind),
    label: first(raw.label),
    season: first(raw.season),
    page: first(raw.page),
  });
  const filters: AnomalyFiltersInput = parsed.success ? parsed.data : {};
  const pageNo = filters.page ?? 1;
  const [series, counts, list, thresholds, weak] = await Promise.all([
    anomalySeriesOfSite(site.id),
    anomalyCountsByLabel(site.id, filters),
    listAnomalies(site.id, filters, { limit: PAGE_SIZE, offset: (pageNo - 1) * PAGE_SIZE }),
    ustarThresholdsForSite(site.id),
    weakTurbulenceForSite(site.id, { label: filters.label, season: filters.season }, { limit: 100 }),
  ]);
  const pages = Math.max(1, Math.ceil(list.total / PAGE_SIZE));
  const pageHref = (p: number) => {
    const q = new URLSearchParams();
    for (const k of ["series", "kind", "label", "season"] as const)
      if (filters[k]) q.set(k, String(filters[k]));
    q.set("page", String(p));
    return `?${q.toString()}`;
  };

  return (
    <>
      <SitePageHeader
        site={site}
        title="Anomalies"
        description="Excursions of each concentration and flux series around sunset against a moving baseline of the same half-hour on nearby days (median and 1.4826 MAD, the evening itself left out; modified z beyond the rule set's threshold for two or more half-hours), and nighttime fluxes under weak turbulence. Each carries its evening's current label."
      />
      <SiteTabs siteId={site.id} />
      <div className="space-y-8">
        <div className="space-y-2 card p-4">
          <LabelCaution />
          <p className="text-xs leading-relaxed text-ink-muted">
            An anomaly is a statistical flag, not a finding: a rise after sunset may be local accumulation on
            a stagnant evening or transport on an advective one, and a spell of bad data looks the same. The
            u* threshold is estimated from this site&apos;s own nighttime data; read its spread before relying
            on it.
          </p>
          {!parsed.success ? (
            <p className="text-xs text-red-700">Some filters were not understood and were ignored.</p>
          ) : null}
        </div>

        <AnomalyFilters series={series} value={filters} />

        <section aria-labelledby="counts" className="space-y-3">
          <h2 id="counts" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
            By evening label
          </h2>
          <LabelCounts counts={counts} />
        </section>

        <section aria-labelledby="list" className="space-y-3">
          <h2 id="list" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
            Anomalies ({list.total})
          </h2>
          <AnomalyTable anomalies={list.anomalies} siteId={site.id} />
          {pages > 1 ? (
            <nav aria-label="Pages" className="flex items-center gap-3 text-sm">
              {pageNo > 1 ? (
                <Link className="btn-quiet" href={pageHref(pageNo - 1)}>
                  Newer
                </Link>
              ) : null}
              <span className="text-ink-muted">
                Page {pageNo} of {pages}
              </span>
              {pageNo < pages ? (
                <Link className="btn-quiet" href={pageHref(pageNo + 1)}>
                  Older
                </Link>
              ) : null}
            </nav>
          ) : null}
        </section>

        <section aria-labelledby="weak" className="space-y-3">
          <h2 id="weak" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
            Weak turbulence at night ({weak.total} nights)
          </h2>
          <p className="text-xs text-ink-muted">
            Nighttime FC half-hours (SW_IN below 10 W/m² or the Sun below the horizon) with u* below the
            year&apos;s threshold; eddy covariance tends to under-read the flux there.
          </p>
          <WeakTurbulenceTable evenings={weak.evenings} byLabel={weak.byLabel} />
        </section>

        <section aria-labelledby="ustar" className="space-y-3">
          <h2 id="ustar" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
            Friction-velocity thresholds
          </h2>
          <p className="text-xs text-ink-muted">
            Moving-point method (Reichstein et al. 2005; Papale et al. 2006): per season, six air-temperature
            classes and twenty u* classes; the threshold is the u* class where the nighttime flux reaches 99 %
            of the mean above it, the median over temperature classes per season, and the seasonal maximum per
            year. Spread from 100 bootstrap resamples. The method tends to land about one u* class above a
            sharp threshold.
          </p>
          <UstarTable thresholds={thresholds} />
        </section>
      </div>
    </>
  );
}
