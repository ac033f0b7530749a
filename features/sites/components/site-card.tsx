import Link from "next/link";
import { LABEL_ORDER, LabelBadge } from "@/lib/ui/label-badge";
import { formatUtcOffset, type SiteCoverage, type SiteSummary } from "@/features/sites/schemas";

function coord(value: number, pos: string, neg: string): string {
  return `${Math.abs(value).toFixed(3)}° ${value < 0 ? neg : pos}`;
}

/** ISO UTC instant as "YYYY-MM-DD HH:MM" on the site's data clock. */
function onDataClock(iso: string, utcOffsetHours: number): string {
  return new Date(Date.parse(iso) + utcOffsetHours * 3_600_000).toISOString().slice(0, 16).replace("T", " ");
}

/** Rounded down, so a record with any gap never reads as 100 %. */
function percentDown(share: number): string {
  return `${(Math.floor(share * 1000) / 10).toFixed(1)} %`;
}

function Coverage({ coverage, utcOffsetHours }: { coverage: SiteCoverage; utcOffsetHours: number }) {
  return (
    <div className="space-y-0.5">
      <p className="font-mono text-xs">
        <time dateTime={coverage.firstUtc}>{onDataClock(coverage.firstUtc, utcOffsetHours)}</time> –{" "}
        <time dateTime={coverage.lastUtc}>{onDataClock(coverage.lastUtc, utcOffsetHours)}</time>{" "}
        <span className="text-ink-muted">{formatUtcOffset(utcOffsetHours)}</span>
      </p>
      <p>
        {percentDown(coverage.share)} of half-hours present{" "}
        <span className="text-ink-muted">
          ({coverage.presentHalfHours.toLocaleString("en")} of {coverage.spanHalfHours.toLocaleString("en")})
        </span>{" "}
        · {coverage.evenings.toLocaleString("en")} evenings
      </p>
    </div>
  );
}

/** One site on the list: where it is, how its tower is set up, what data it has. */
export function SiteCard({ site }: { site: SiteSummary }) {
  return (
    <article className="group relative flex flex-col gap-4 card p-5 transition-shadow hover:shadow-md">
      <header className="space-y-1">
        <h2 className="text-base font-semibold text-ink">
          <Link href={`/sites/${site.id}`} className="after:absolute after:inset-0 after:rounded-xl">
            {site.name}
          </Link>
        </h2>
        <p className="font-mono text-xs text-ink-muted">
          {coord(site.latitude, "N", "S")}, {coord(site.longitude, "E", "W")} · {site.elevationM} m a.s.l.
        </p>
      </header>

      <dl className="grid grid-cols-3 gap-2 text-xs">
        <div className="rounded-lg bg-surface-sunken px-2.5 py-2">
          <dt className="text-ink-muted">Sensor</dt>
          <dd className="font-mono text-sm text-ink">{site.measurementHeightM} m</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken px-2.5 py-2">
          <dt className="text-ink-muted">Canopy</dt>
          <dd className="font-mono text-sm text-ink">{site.canopyHeightM} m</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken px-2.5 py-2">
          <dt className="text-ink-muted">Clock</dt>
          <dd className="font-mono text-sm text-ink">{formatUtcOffset(site.utcOffsetHours)}</dd>
        </div>
      </dl>

      <dl className="space-y-3 border-t border-line pt-3 text-sm">
        <div className="space-y-1">
          <dt className="text-ink-muted">Data coverage</dt>
          <dd className="text-ink">
            {site.coverage ? (
              <Coverage coverage={site.coverage} utcOffsetHours={site.utcOffsetHours} />
            ) : (
              <span className="text-ink-muted italic">no data yet</span>
            )}
          </dd>
        </div>
        <div className="space-y-1">
          <dt className="text-ink-muted">Evening labels</dt>
          <dd>
            {site.labelCounts ? (
              <ul className="grid grid-cols-2 gap-x-4 gap-y-1">
                {LABEL_ORDER.map((l) => (
                  <li key={l} className="flex items-center justify-between gap-2">
                    <LabelBadge label={l} />
                    <span className="font-mono text-xs text-ink tabular-nums">
                      {site.labelCounts?.[l] ?? 0}
                    </span>
                  </li>
                ))}
              </ul>
            ) : (
              <span className="text-ink-muted italic">no evenings yet</span>
            )}
          </dd>
        </div>
      </dl>
    </article>
  );
}
