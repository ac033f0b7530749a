import Link from "next/link";
import { LABEL_ORDER, LabelBadge } from "@/lib/ui/label-badge";
import { formatUtcOffset, type SiteSummary } from "@/features/sites/schemas";

function coord(value: number, pos: string, neg: string): string {
  return `${Math.abs(value).toFixed(3)}° ${value < 0 ? neg : pos}`;
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

      <dl className="space-y-2 border-t border-line pt-3 text-sm">
        <div className="flex items-baseline justify-between gap-3">
          <dt className="text-ink-muted">Data coverage</dt>
          <dd className="text-ink">
            {site.coverage ? (
              `${site.coverage.firstDay} – ${site.coverage.lastDay} · ${site.coverage.evenings} evenings`
            ) : (
              <span className="text-ink-muted italic">no data yet</span>
            )}
          </dd>
        </div>
        <div className="flex items-center justify-between gap-3">
          <dt className="text-ink-muted">Evening labels</dt>
          <dd>
            {site.labelCounts ? (
              <ul className="flex gap-3">
                {LABEL_ORDER.map((l) => (
                  <li key={l} className="flex items-center gap-1 font-mono text-xs">
                    <LabelBadge label={l} compact />
                    {site.labelCounts?.[l] ?? 0}
                  </li>
                ))}
              </ul>
            ) : (
              <span className="text-ink-muted italic">no data yet</span>
            )}
          </dd>
        </div>
      </dl>
    </article>
  );
}
