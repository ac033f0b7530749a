import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { roleAtLeast } from "@/lib/auth/roles";
import { AuthError } from "@/lib/auth/session";
import { LabelCaution } from "@/lib/ui/caution";
import { PageHeader } from "@/lib/ui/page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { formatUtcOffset } from "@/features/sites/schemas";
import { idSchema, type EveningDetail } from "@/features/review/schemas";
import { getEveningDetail } from "@/features/review/server/queries";
import { dayTitle } from "@/features/review/calendar-grid";
import { EveningCharts } from "@/features/review/components/evening-charts";
import { EveningReview } from "@/features/review/components/evening-review";
import { HistoryList, ThresholdTable } from "@/features/review/components/evening-facts";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { anomaliesForEvening, weakTurbulenceForEvening } from "@/lib/anomalies/server/queries";
import { EveningAnomalies } from "@/features/anomalies/components/anomaly-tables";

type Props = { params: Promise<{ siteId: string; eveningId: string }> };

async function load(params: Props["params"]) {
  const p = await params;
  const { site, role } = await loadSiteForPage(p.siteId);
  const id = idSchema.safeParse(p.eveningId);
  if (!id.success) notFound();
  let detail: EveningDetail;
  try {
    detail = await getEveningDetail(id.data, site);
  } catch (err) {
    if (err instanceof AuthError) notFound();
    throw err;
  }
  return { site, role, detail };
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site, detail } = await load(params);
  return { title: `Evening ${detail.evening.date} · ${site.name}` };
}

function pct(v: number): string {
  return `${Math.round(v * 100)} %`;
}

export default async function EveningPage({ params }: Props) {
  const { site, role, detail } = await load(params);
  const e = detail.evening;
  const [anomalies, weak] = await Promise.all([anomaliesForEvening(e.id), weakTurbulenceForEvening(e.id)]);
  const href = (n: { id: number } | null) => (n ? `/sites/${site.id}/evenings/${n.id}` : null);
  const prev = detail.neighbours.previous;
  const next = detail.neighbours.next;
  const clock = (iso: string | null) =>
    iso ? new Date(Date.parse(iso) + site.utcOffsetHours * 3_600_000).toISOString().slice(11, 16) : "—";

  return (
    <>
      <PageHeader
        eyebrow={
          <Link href={`/sites/${site.id}/calendar?month=${e.date.slice(0, 7)}`} className="hover:underline">
            ← Calendar · {site.name}
          </Link>
        }
        title={`Evening of ${dayTitle(e.date)}`}
        description={`Sunset ${clock(e.sunsetUtc)}, civil dusk ${clock(e.civilDuskUtc)} (${formatUtcOffset(site.utcOffsetHours)}, the data clock).`}
        actions={
          <>
            {prev ? (
              <Link href={href(prev)!} className="btn-quiet" rel="prev">
                <span aria-hidden="true">←</span> {prev.date} <kbd className="font-mono text-[10px] text-ink-muted">k</kbd>
              </Link>
            ) : (
              <span className="btn-quiet opacity-50" aria-disabled="true">
                First evening
              </span>
            )}
            {next ? (
              <Link href={href(next)!} className="btn-quiet" rel="next">
                {next.date} <span aria-hidden="true">→</span> <kbd className="font-mono text-[10px] text-ink-muted">j</kbd>
              </Link>
            ) : (
              <span className="btn-quiet opacity-50" aria-disabled="true">
                Last evening
              </span>
            )}
          </>
        }
      />
      <SiteTabs siteId={site.id} />
      <LabelCaution className="mb-5" />

      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-6">
          <section aria-labelledby="charts-title" className="card p-5">
            <h2 id="charts-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Four hours either side of sunset
            </h2>
            <EveningCharts
              series={detail.series}
              windows={detail.windows}
              centreMs={detail.centreMs}
              sunsetMs={e.sunsetUtc ? Date.parse(e.sunsetUtc) : null}
              duskMs={e.civilDuskUtc ? Date.parse(e.civilDuskUtc) : null}
              utcOffsetHours={site.utcOffsetHours}
              anomalies={anomalies.map((a) => ({
                series: a.series,
                kind: a.kind,
                startMs: Date.parse(a.start),
                endMs: Date.parse(a.end),
                peakScore: a.peakScore,
              }))}
              weak={
                weak && weak.weakPeriods > 0
                  ? {
                      fluxSeries: weak.fluxSeries,
                      thresholdMs: weak.thresholdMs,
                      weakPeriods: weak.weakPeriods,
                      nightPeriods: weak.nightPeriods,
                      firstWeakMs: weak.firstWeak ? Date.parse(weak.firstWeak) : null,
                      lastWeakMs: weak.lastWeak ? Date.parse(weak.lastWeak) : null,
                    }
                  : null
              }
            />
          </section>

          <section aria-labelledby="metrics-title" className="card space-y-4 p-5">
            <h2 id="metrics-title" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Metrics and thresholds
            </h2>
            <ThresholdTable rows={detail.thresholds} rule={e.rule} ruleDescription={detail.ruleDescription} />
            <div className="grid gap-4 text-sm sm:grid-cols-2">
              <div>
                <h3 className="mb-1 font-medium">Reasons</h3>
                <ul className="list-disc space-y-1 pl-5 text-ink-muted">
                  {e.reasons.map((r) => (
                    <li key={r}>{r}</li>
                  ))}
                </ul>
              </div>
              <div>
                <h3 className="mb-1 font-medium">Data coverage</h3>
                <p className="text-ink-muted">
                  afternoon {pct(e.metrics.coverage.afternoon)} · transition {pct(e.metrics.coverage.transition)} · evening{" "}
                  {pct(e.metrics.coverage.evening)}
                </p>
                {e.metrics.derived.length ? (
                  <p className="mt-1 text-xs text-ink-muted">Derived: {e.metrics.derived.join("; ")}</p>
                ) : null}
                <p className="mt-1 text-xs text-ink-muted">
                  {e.ruleSetName ?? "Default rules"}
                  {e.ruleSetVersion ? ` v${e.ruleSetVersion}` : ""} · computed {e.computedAt.slice(0, 16).replace("T", " ")} UTC
                </p>
              </div>
            </div>
          </section>
        </div>

        <div className="space-y-6">
          <EveningReview
            siteId={site.id}
            eveningId={e.id}
            label={e.label}
            autoLabel={e.autoLabel}
            source={e.source}
            version={e.version}
            reviewed={e.reviewed}
            canEdit={roleAtLeast(role, "analyst")}
            canRevert={roleAtLeast(role, "lead")}
            previousHref={href(prev)}
            nextHref={href(next)}
          />
          <section aria-labelledby="anomalies-title" className="card p-5">
            <h2 id="anomalies-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Anomalies
            </h2>
            <EveningAnomalies anomalies={anomalies} weak={weak} siteId={site.id} utcOffsetHours={site.utcOffsetHours} />
          </section>
          <section aria-labelledby="history-title" className="card p-5">
            <h2 id="history-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              History
            </h2>
            <HistoryList entries={detail.history} evening={e} />
          </section>
        </div>
      </div>
    </>
  );
}
