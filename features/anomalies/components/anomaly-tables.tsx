import { ANOMALY_KINDS, type AnomalyKind } from "@/lib/anomalies/detect";
import type { StoredAnomaly, StoredThreshold, WeakTurbulenceEvening } from "@/lib/anomalies/server/queries";
import { LabelBadge, LABEL_ORDER, type LabelKey } from "@/lib/ui/label-badge";
import { KIND_NAMES, SEASON_NAMES } from "@/features/anomalies/schemas";

const th = "px-3 py-2";
const td = "px-3 py-1.5";
const head = "bg-surface-sunken text-xs tracking-wide text-ink-muted uppercase";

function Table({ caption, children }: { caption: string; children: React.ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line">
      <table className="min-w-full text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        {children}
      </table>
    </div>
  );
}

const fmt = (v: number | null, digits = 2) => (v === null || !Number.isFinite(v) ? "–" : v.toFixed(digits));
const hhmm = (iso: string) => iso.slice(11, 16);

/** Counts of anomalies per series and kind, split by the evenings' current labels. */
export function LabelCounts({
  counts,
}: {
  counts: Array<{ series: string; kind: AnomalyKind; label: LabelKey; count: number }>;
}) {
  if (counts.length === 0) return <p className="text-sm text-ink-muted italic">No anomalies match.</p>;
  const keys = [...new Set(counts.map((c) => `${c.series}\u0000${c.kind}`))].sort((a, b) => {
    const [sa, ka] = a.split("\u0000") as [string, AnomalyKind];
    const [sb, kb] = b.split("\u0000") as [string, AnomalyKind];
    return sa.localeCompare(sb) || ANOMALY_KINDS.indexOf(ka) - ANOMALY_KINDS.indexOf(kb);
  });
  const n = (key: string, label: LabelKey) =>
    counts.find((c) => `${c.series}\u0000${c.kind}` === key && c.label === label)?.count ?? 0;
  return (
    <Table caption="Anomalies by series, kind and evening label">
      <thead className={head}>
        <tr>
          <th scope="col" className={th}>
            Series
          </th>
          <th scope="col" className={th}>
            Kind
          </th>
          {LABEL_ORDER.map((l) => (
            <th key={l} scope="col" className={`${th} text-right`}>
              <LabelBadge label={l} compact />
            </th>
          ))}
          <th scope="col" className={`${th} text-right`}>
            All
          </th>
        </tr>
      </thead>
      <tbody className="divide-y divide-line">
        {keys.map((key) => {
          const [series, kind] = key.split("\u0000") as [string, AnomalyKind];
          return (
            <tr key={key}>
              <td className={`${td} font-mono text-xs`}>{series}</td>
              <td className={td}>{KIND_NAMES[kind]}</td>
              {LABEL_ORDER.map((l) => (
                <td key={l} className={`${td} text-right tabular-nums`}>
                  {n(key, l)}
                </td>
              ))}
              <td className={`${td} text-right font-semibold tabular-nums`}>
                {LABEL_ORDER.reduce((s, l) => s + n(key, l), 0)}
              </td>
            </tr>
          );
        })}
      </tbody>
    </Table>
  );
}

/** The anomalies themselves, each with its evening's current label. */
export function AnomalyTable({ anomalies, siteId }: { anomalies: StoredAnomaly[]; siteId: number }) {
  if (anomalies.length === 0) return <p className="text-sm text-ink-muted italic">No anomalies match.</p>;
  return (
    <Table caption="Anomalies">
      <thead className={head}>
        <tr>
          <th scope="col" className={th}>
            Evening
          </th>
          <th scope="col" className={th}>
            Label
          </th>
          <th scope="col" className={th}>
            Series
          </th>
          <th scope="col" className={th}>
            Kind
          </th>
          <th scope="col" className={th}>
            UTC
          </th>
          <th scope="col" className={`${th} text-right`}>
            Peak score
          </th>
          <th scope="col" className={`${th} text-right`}>
            Value / baseline
          </th>
        </tr>
      </thead>
      <tbody className="divide-y divide-line">
        {anomalies.map((a) => (
          <tr key={a.id}>
            <td className={`${td} font-mono text-xs`}>
              <a className="hover:underline" href={`/sites/${siteId}/evenings/${a.eveningId}`}>
                {a.eveningDate}
              </a>
            </td>
            <td className={td}>
              <LabelBadge label={a.label} />
              {a.labelSource === "override" ? (
                <span className="ml-1 text-xs text-ink-muted">(override)</span>
              ) : null}
            </td>
            <td className={`${td} font-mono text-xs`}>{a.series}</td>
            <td className={td}>{KIND_NAMES[a.kind]}</td>
            <td className={`${td} font-mono text-xs`}>
              {hhmm(a.start)}–{hhmm(a.end)}
            </td>
            <td className={`${td} text-right tabular-nums`}>{fmt(a.peakScore, 1)}</td>
            <td className={`${td} text-right tabular-nums`}>
              {fmt(a.peakValue, 1)} / {fmt(a.baselineValue, 1)}
            </td>
          </tr>
        ))}
      </tbody>
    </Table>
  );
}

/** u* thresholds per season-year and season with the bootstrap spread. */
export function UstarTable({ thresholds }: { thresholds: StoredThreshold[] }) {
  if (thresholds.length === 0)
    return (
      <p className="text-sm text-ink-muted italic">
        No threshold yet: it needs nighttime u*, FC and air temperature.
      </p>
    );
  return (
    <Table caption="Friction-velocity thresholds">
      <thead className={head}>
        <tr>
          <th scope="col" className={th}>
            Season
          </th>
          <th scope="col" className={`${th} text-right`}>
            u* threshold (m/s)
          </th>
          <th scope="col" className={`${th} text-right`}>
            5–95 % (bootstrap)
          </th>
          <th scope="col" className={`${th} text-right`}>
            Night points
          </th>
        </tr>
      </thead>
      <tbody className="divide-y divide-line">
        {thresholds.map((t) => (
          <tr
            key={`${t.seasonYear}-${t.season}`}
            className={t.season === "year" ? "font-semibold" : undefined}
          >
            <td className={td}>
              {t.season === "year"
                ? `${t.seasonYear} (applied: seasonal maximum)`
                : `${SEASON_NAMES[t.season]} ${t.seasonYear}`}
            </td>
            <td className={`${td} text-right tabular-nums`}>{fmt(t.thresholdMs)}</td>
            <td className={`${td} text-right tabular-nums`}>
              {fmt(t.bootstrap.p05)}–{fmt(t.bootstrap.p95)}
              <span className="ml-1 text-xs font-normal text-ink-muted">
                ({t.bootstrap.found}/{t.bootstrap.resamples})
              </span>
            </td>
            <td className={`${td} text-right tabular-nums`}>{t.points}</td>
          </tr>
        ))}
      </tbody>
    </Table>
  );
}

/** Evenings whose night had flux periods under weak turbulence. */
export function WeakTurbulenceTable({
  evenings,
  byLabel,
}: {
  evenings: WeakTurbulenceEvening[];
  byLabel: Array<{ label: LabelKey; evenings: number; weakPeriods: number; nightPeriods: number }>;
}) {
  if (evenings.length === 0)
    return <p className="text-sm text-ink-muted italic">No weak-turbulence nights match.</p>;
  return (
    <div className="space-y-4">
      <ul className="flex flex-wrap gap-4 text-sm">
        {byLabel.map((b) => (
          <li key={b.label} className="flex items-center gap-2">
            <LabelBadge label={b.label} compact />
            <span className="tabular-nums">
              {b.evenings} nights, {b.weakPeriods} of {b.nightPeriods} night flux half-hours
            </span>
          </li>
        ))}
      </ul>
      <Table caption="Weak-turbulence nights">
        <thead className={head}>
          <tr>
            <th scope="col" className={th}>
              Evening
            </th>
            <th scope="col" className={th}>
              Label
            </th>
            <th scope="col" className={`${th} text-right`}>
              Weak / night half-hours
            </th>
            <th scope="col" className={`${th} text-right`}>
              u* threshold (m/s)
            </th>
            <th scope="col" className={th}>
              First–last weak (UTC)
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {evenings.map((w) => (
            <tr key={w.eveningId}>
              <td className={`${td} font-mono text-xs`}>{w.eveningDate}</td>
              <td className={td}>
                <LabelBadge label={w.label} />
              </td>
              <td className={`${td} text-right tabular-nums`}>
                {w.weakPeriods} / {w.nightPeriods}
              </td>
              <td className={`${td} text-right tabular-nums`}>{fmt(w.thresholdMs)}</td>
              <td className={`${td} font-mono text-xs`}>
                {w.firstWeak
                  ? `${w.firstWeak.slice(5, 16).replace("T", " ")}–${(w.lastWeak ?? "").slice(11, 16)}`
                  : "–"}
              </td>
            </tr>
          ))}
        </tbody>
      </Table>
    </div>
  );
}

/** The anomalies and weak-turbulence flag of one evening, for the evening page. */
export function EveningAnomalies({
  anomalies,
  weak,
  siteId,
  utcOffsetHours,
}: {
  anomalies: StoredAnomaly[];
  weak: WeakTurbulenceEvening | null;
  siteId: number;
  utcOffsetHours: number;
}) {
  const clock = (iso: string) =>
    new Date(Date.parse(iso) + utcOffsetHours * 3_600_000).toISOString().slice(11, 16);
  return (
    <div className="space-y-3 text-sm">
      {anomalies.length === 0 ? (
        <p className="text-ink-muted italic">No anomalies around this sunset.</p>
      ) : (
        <ul className="space-y-1.5">
          {anomalies.map((a) => (
            <li key={a.id} className="flex flex-wrap items-baseline gap-x-2">
              <span className="font-mono text-xs">{a.series}</span>
              <span>{KIND_NAMES[a.kind]}</span>
              <span className="font-mono text-xs text-ink-muted">
                {clock(a.start)}–{clock(a.end)}
              </span>
              <span className="text-xs text-ink-muted tabular-nums">M = {fmt(a.peakScore, 1)}</span>
            </li>
          ))}
        </ul>
      )}
      {weak ? (
        <p className={weak.weakPeriods > 0 ? "" : "text-ink-muted"}>
          {weak.weakPeriods > 0
            ? `Weak turbulence: ${weak.weakPeriods} of ${weak.nightPeriods} night ${weak.fluxSeries} half-hours below u* ${fmt(weak.thresholdMs)} m/s.`
            : `No night ${weak.fluxSeries} half-hour below u* ${fmt(weak.thresholdMs)} m/s.`}
        </p>
      ) : null}
      <a className="text-xs hover:underline" href={`/sites/${siteId}/anomalies`}>
        All anomalies of this site →
      </a>
    </div>
  );
}
