import { ANOMALY_KINDS, type AnomalyKind } from "@/lib/anomalies/detect";
import type { StoredAnomaly, StoredThreshold, WeakTurbulenceEvening } from "@/lib/anomalies/server/queries";
import { LabelBadge, LABEL_ORDER, type LabelKey } from "@/lib/ui/label-badge";
import { KIND_NAMES, SEASON_NAMES } from "@/features/anomalies/schemas";

const head = "bg-surface-sunken text-xs tracking-wide text-ink-muted uppercase";

/** One column: its header, how a row fills its cell, and whether it holds figures (right-aligned). */
type Column<T> = {
  key: string;
  header: React.ReactNode;
  cell: (row: T) => React.ReactNode;
  numeric?: boolean;
  /** classes of the body cell, e.g. "font-mono text-xs" */
  className?: string;
};

/** The table markup every list on this screen shares: caption for screen readers, header row, body. */
function DataTable<T>({
  caption,
  columns,
  rows,
  rowKey,
  rowClassName,
}: {
  caption: string;
  columns: ReadonlyArray<Column<T>>;
  rows: readonly T[];
  rowKey: (row: T) => string | number;
  rowClassName?: (row: T) => string | undefined;
}) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line">
      <table className="min-w-full text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className={head}>
          <tr>
            {columns.map((c) => (
              <th key={c.key} scope="col" className={`px-3 py-2 ${c.numeric ? "text-right" : ""}`}>
                {c.header}
              </th>
            ))}
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {rows.map((row) => (
            <tr key={rowKey(row)} className={rowClassName?.(row)}>
              {columns.map((c) => (
                <td
                  key={c.key}
                  className={`px-3 py-1.5 ${c.numeric ? "text-right tabular-nums" : ""} ${c.className ?? ""}`}
                >
                  {c.cell(row)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

const Empty = ({ children }: { children: React.ReactNode }) => (
  <p className="text-sm text-ink-muted italic">{children}</p>
);

const fmt = (v: number | null, digits = 2) => (v === null || !Number.isFinite(v) ? "–" : v.toFixed(digits));
const hhmm = (iso: string) => iso.slice(11, 16);
const MONO = "font-mono text-xs";

type CountRow = { key: string; series: string; kind: AnomalyKind; byLabel: Record<LabelKey, number> };

/** Counts of anomalies per series and kind, split by the evenings' current labels. */
export function LabelCounts({
  counts,
}: {
  counts: Array<{ series: string; kind: AnomalyKind; label: LabelKey; count: number }>;
}) {
  if (counts.length === 0) return <Empty>No anomalies match.</Empty>;
  const rows = new Map<string, CountRow>();
  for (const c of counts) {
    const key = `${c.series}\u0000${c.kind}`;
    let row = rows.get(key);
    if (!row) {
      row = {
        key,
        series: c.series,
        kind: c.kind,
        byLabel: { local: 0, stagnant: 0, advective: 0, unclassified: 0 },
      };
      rows.set(key, row);
    }
    row.byLabel[c.label] += c.count;
  }
  const sorted = [...rows.values()].sort(
    (a, b) =>
      a.series.localeCompare(b.series) || ANOMALY_KINDS.indexOf(a.kind) - ANOMALY_KINDS.indexOf(b.kind),
  );
  const columns: Array<Column<CountRow>> = [
    { key: "series", header: "Series", cell: (r) => r.series, className: MONO },
    { key: "kind", header: "Kind", cell: (r) => KIND_NAMES[r.kind] },
    ...LABEL_ORDER.map((l) => ({
      key: l,
      header: <LabelBadge label={l} compact />,
      cell: (r: CountRow) => r.byLabel[l],
      numeric: true,
    })),
    {
      key: "all",
      header: "All",
      cell: (r) => LABEL_ORDER.reduce((sum, l) => sum + r.byLabel[l], 0),
      numeric: true,
      className: "font-semibold",
    },
  ];
  return (
    <DataTable
      caption="Anomalies by series, kind and evening label"
      columns={columns}
      rows={sorted}
      rowKey={(r) => r.key}
    />
  );
}

/** The anomalies themselves, each with its evening's current label. */
export function AnomalyTable({ anomalies, siteId }: { anomalies: StoredAnomaly[]; siteId: number }) {
  if (anomalies.length === 0) return <Empty>No anomalies match.</Empty>;
  const columns: Array<Column<StoredAnomaly>> = [
    {
      key: "evening",
      header: "Evening",
      className: MONO,
      cell: (a) => (
        <a className="hover:underline" href={`/sites/${siteId}/evenings/${a.eveningId}`}>
          {a.eveningDate}
        </a>
      ),
    },
    {
      key: "label",
      header: "Label",
      cell: (a) => (
        <>
          <LabelBadge label={a.label} />
          {a.labelSource === "override" ? (
            <span className="ml-1 text-xs text-ink-muted">(override)</span>
          ) : null}
        </>
      ),
    },
    { key: "series", header: "Series", cell: (a) => a.series, className: MONO },
    { key: "kind", header: "Kind", cell: (a) => KIND_NAMES[a.kind] },
    { key: "utc", header: "UTC", cell: (a) => `${hhmm(a.start)}–${hhmm(a.end)}`, className: MONO },
    { key: "score", header: "Peak score", cell: (a) => fmt(a.peakScore, 1), numeric: true },
    {
      key: "value",
      header: "Value / baseline",
      cell: (a) => `${fmt(a.peakValue, 1)} / ${fmt(a.baselineValue, 1)}`,
      numeric: true,
    },
  ];
  return <DataTable caption="Anomalies" columns={columns} rows={anomalies} rowKey={(a) => a.id} />;
}

/** u* thresholds per season-year and season with the bootstrap spread. */
export function UstarTable({ thresholds }: { thresholds: StoredThreshold[] }) {
  if (thresholds.length === 0)
    return <Empty>No threshold yet: it needs nighttime u*, FC and air temperature.</Empty>;
  const columns: Array<Column<StoredThreshold>> = [
    {
      key: "season",
      header: "Season",
      cell: (t) =>
        t.season === "year"
          ? `${t.seasonYear} (applied: seasonal maximum)`
          : `${SEASON_NAMES[t.season]} ${t.seasonYear}`,
    },
    { key: "threshold", header: "u* threshold (m/s)", cell: (t) => fmt(t.thresholdMs), numeric: true },
    {
      key: "spread",
      header: "5–95 % (bootstrap)",
      numeric: true,
      cell: (t) => (
        <>
          {fmt(t.bootstrap.p05)}–{fmt(t.bootstrap.p95)}
          <span className="ml-1 text-xs font-normal text-ink-muted">
            ({t.bootstrap.found}/{t.bootstrap.resamples})
          </span>
        </>
      ),
    },
    { key: "points", header: "Night points", cell: (t) => t.points, numeric: true },
  ];
  return (
    <DataTable
      caption="Friction-velocity thresholds"
      columns={columns}
      rows={thresholds}
      rowKey={(t) => `${t.seasonYear}-${t.season}`}
      rowClassName={(t) => (t.season === "year" ? "font-semibold" : undefined)}
    />
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
  if (evenings.length === 0) return <Empty>No weak-turbulence nights match.</Empty>;
  const columns: Array<Column<WeakTurbulenceEvening>> = [
    { key: "evening", header: "Evening", cell: (w) => w.eveningDate, className: MONO },
    { key: "label", header: "Label", cell: (w) => <LabelBadge label={w.label} /> },
    {
      key: "periods",
      header: "Weak / night half-hours",
      cell: (w) => `${w.weakPeriods} / ${w.nightPeriods}`,
      numeric: true,
    },
    { key: "threshold", header: "u* threshold (m/s)", cell: (w) => fmt(w.thresholdMs), numeric: true },
    {
      key: "span",
      header: "First–last weak (UTC)",
      className: MONO,
      cell: (w) =>
        w.firstWeak
          ? `${w.firstWeak.slice(5, 16).replace("T", " ")}–${(w.lastWeak ?? "").slice(11, 16)}`
          : "–",
    },
  ];
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
      <DataTable
        caption="Weak-turbulence nights"
        columns={columns}
        rows={evenings}
        rowKey={(w) => w.eveningId}
      />
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
