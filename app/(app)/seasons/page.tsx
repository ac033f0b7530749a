import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { getActiveGroup, requireSession, AuthError } from "@/lib/auth/session";
import { LabelCaution } from "@/lib/ui/caution";
import { PageHeader } from "@/lib/ui/page-header";
import { seasonQuerySchema, type SeasonQuery, type SeasonReport } from "@/features/seasons/schemas";
import { eveningExtent, seasonReport, sitesOfGroup } from "@/features/seasons/server/queries";
import { csvRows, overallCells } from "@/features/seasons/report-rows";
import { SeasonControls } from "@/features/seasons/components/season-controls";
import { SeasonChart, type Bar } from "@/features/seasons/components/season-chart";
import { SeasonTable } from "@/features/seasons/components/season-table";
import { SeasonTestPanel } from "@/features/seasons/components/season-test";
import { CsvDownload } from "@/features/seasons/components/csv-download";

export const metadata: Metadata = { title: "Seasons" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

export default async function SeasonsPage({ searchParams }: Props) {
  const { user } = await requireSession().catch(() => redirect("/sign-in"));
  const active = await getActiveGroup();
  if (!active)
    return <PageHeader title="Seasons" description="You are not a member of any research group yet." />;
  const sp = await searchParams;
  const sites = await sitesOfGroup(active.groupId);
  if (sites.length === 0) {
    return (
      <PageHeader
        title="Seasons"
        eyebrow={active.groupName}
        description="Add a site and import its data to count evenings by season."
      />
    );
  }
  const picked = [sp.site, sp.sites]
    .flat()
    .filter((v): v is string => typeof v === "string")
    .join(",");
  const raw = {
    sites: picked || sites.map((s) => s.id).join(","),
    from: first(sp.from),
    to: first(sp.to),
    scheme: first(sp.scheme),
    labels: first(sp.labels),
    seasonName: first(sp.seasonName),
    seasonStart: first(sp.seasonStart),
    seasonEnd: first(sp.seasonEnd),
  };
  const parsed = seasonQuerySchema.safeParse(raw);
  let report: SeasonReport | null = null;
  let errors: string[] = [];
  let query: Partial<SeasonQuery> = {};
  if (parsed.success) {
    query = parsed.data;
    if (!query.from || !query.to) {
      const extent = await eveningExtent(parsed.data.sites);
      query = {
        ...query,
        from: query.from ?? extent.from ?? undefined,
        to: query.to ?? extent.to ?? undefined,
      };
    }
    try {
      report = await seasonReport(user, { ...parsed.data, from: query.from, to: query.to });
    } catch (err) {
      if (!(err instanceof AuthError)) throw err;
      errors = ["One of the chosen sites is not available to you."];
    }
  } else {
    errors = parsed.error.issues.map((i) => i.message);
  }

  const fileBase = report
    ? `gloaming-seasons-${report.scheme}-${report.from ?? "start"}_${report.to ?? "end"}`
    : "gloaming-seasons";
  const catName = new Map(report?.categories.map((c) => [c.key, c.name]));
  const totals: Bar[] = report
    ? overallCells(report, "all").map((c) => ({
        key: c.category,
        name: catName.get(c.category) ?? c.category,
        counts: c.counts,
      }))
    : [];
  const byYear: Bar[] = report
    ? overallCells(report, "each")
        .filter((c) => c.total > 0)
        .map((c) => ({
          key: `${c.year}-${c.category}`,
          name: `${(catName.get(c.category) ?? c.category).slice(0, 3)} '${String(c.year).slice(-2)}`,
          counts: c.counts,
        }))
    : [];
  const labelsWord = report?.labels === "auto" ? "automatic labels" : "final labels";
  const siteWord = report
    ? report.sites.length === 1
      ? report.sites[0]?.name
      : `${report.sites.length} sites`
    : "";
  const hemispheres = new Set(report?.sites.map((s) => s.hemisphere));

  return (
    <>
      <PageHeader
        eyebrow={active.groupName}
        title="Seasons"
        description="How the evening labels are spread over the seasons and the years, with a test of whether the mix changes with the season."
      />
      <div className="space-y-6">
        <LabelCaution />
        <SeasonControls
          sites={sites}
          query={query.sites ? query : { ...query, sites: sites.map((s) => s.id) }}
          errors={errors}
        />
        {report ? (
          <>
            <p className="text-sm text-ink-muted">
              {siteWord}, {report.from ?? "…"} to {report.to ?? "…"}, {labelsWord}.{" "}
              {report.scheme === "meteorological"
                ? hemispheres.has("south")
                  ? "Seasons follow each site's hemisphere: south of the equator December to February is summer."
                  : "Meteorological seasons: winter is December to February."
                : null}{" "}
              A season that spans the new year counts in the year it ends.
            </p>
            <div className="grid gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
              <section aria-labelledby="totals-title" className="space-y-4 card p-5">
                <h2 id="totals-title" className="sr-only">
                  All years
                </h2>
                <SeasonChart
                  title={`Evenings per ${report.scheme === "month" ? "month" : "season"}, all years`}
                  bars={totals}
                  fileBase={`${fileBase}-totals`}
                />
              </section>
              <section aria-labelledby="test-title" className="space-y-3 card p-5">
                <h2 id="test-title" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
                  Does the mix change with the season?
                </h2>
                <SeasonTestPanel report={report} />
              </section>
            </div>
            {report.years.length > 1 ? (
              <section aria-labelledby="years-title" className="card p-5">
                <h2 id="years-title" className="sr-only">
                  By year
                </h2>
                <SeasonChart
                  title="Evenings by year and season"
                  bars={byYear}
                  fileBase={`${fileBase}-by-year`}
                />
              </section>
            ) : null}
            <section aria-labelledby="table-title" className="space-y-3 card p-5">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <h2 id="table-title" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
                  The numbers
                </h2>
                <CsvDownload rows={csvRows(report)} fileName={`${fileBase}.csv`}>
                  Table as CSV
                </CsvDownload>
              </div>
              <SeasonTable report={report} />
            </section>
          </>
        ) : null}
      </div>
    </>
  );
}
