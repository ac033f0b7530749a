import type { ImportReport } from "@/features/imports/schemas";

const nf = new Intl.NumberFormat("en-GB");
const fmt = (n: number) => nf.format(n);
const when = (iso: string | null) => (iso ? `${iso.slice(0, 16).replace("T", " ")} UTC` : "-");

/** The validation report of one import: what was read per column, what was rejected and why. */
export function ReportView({ report, rejectedHref }: { report: ImportReport; rejectedHref: string }) {
  if (report.refusal && report.rows === 0) {
    return (
      <div role="alert" className="rounded-lg border border-red-300 bg-red-50 p-4 text-sm text-red-900 dark:border-red-800 dark:bg-red-950/40 dark:text-red-100">
        <p className="font-semibold">File refused before anything was written</p>
        <p className="mt-1">
          {report.refusal.message}
          {report.refusal.row !== null ? ` (line ${report.refusal.row})` : ""}
        </p>
      </div>
    );
  }
  return (
    <div className="space-y-5 text-sm" data-testid="import-report">
      {report.refusal ? (
        <p role="alert" className="rounded-lg border border-amber-300 bg-amber-50 p-3 text-amber-950 dark:border-amber-700 dark:bg-amber-950/40 dark:text-amber-100">
          {report.refusal.message}
        </p>
      ) : null}
      <dl className="grid grid-cols-2 gap-x-6 gap-y-2 sm:grid-cols-4">
        <Fact label="Rows read" value={fmt(report.rows)} />
        <Fact label="Rows written" value={report.written ? fmt(report.written.rows) : "-"} />
        <Fact label="Period" value={`${report.periodMinutes} min`} />
        <Fact label="Evenings classified" value={report.evenings ? fmt(report.evenings.computed) : "-"} />
        <Fact label="First period starts" value={when(report.firstStartUtc)} />
        <Fact label="Last period starts" value={when(report.lastStartUtc)} />
        <Fact label="Timestamps" value={`${report.timestamp.columns.join(" + ")} (${report.timestamp.convention})`} />
        <Fact label="Data clock" value={`UTC${report.timestamp.clockUtcOffsetHours >= 0 ? "+" : ""}${report.timestamp.clockUtcOffsetHours} h`} />
      </dl>

      <div className="overflow-x-auto rounded-lg border border-line">
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Per column: values read, missing, not numeric, out of range, unit conversion</caption>
          <thead className="bg-surface-sunken text-xs tracking-wide text-ink-muted uppercase">
            <tr>
              <th scope="col" className="px-3 py-2">Column</th>
              <th scope="col" className="px-3 py-2">Read as</th>
              <th scope="col" className="px-3 py-2 text-right">Read</th>
              <th scope="col" className="px-3 py-2 text-right">Missing</th>
              <th scope="col" className="px-3 py-2 text-right">Not a number</th>
              <th scope="col" className="px-3 py-2 text-right">Out of range</th>
              <th scope="col" className="px-3 py-2">Converted</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {report.columns.map((c) => (
              <tr key={c.header}>
                <td className="px-3 py-1.5 font-mono text-xs">{c.header}</td>
                <td className="px-3 py-1.5">{c.variable}</td>
                <td className="px-3 py-1.5 text-right tabular-nums">{fmt(c.read)}</td>
                <td className="px-3 py-1.5 text-right tabular-nums">{fmt(c.missing)}</td>
                <td className={`px-3 py-1.5 text-right tabular-nums ${c.notNumeric ? "font-semibold text-amber-800 dark:text-amber-300" : ""}`}>{fmt(c.notNumeric)}</td>
                <td className={`px-3 py-1.5 text-right tabular-nums ${c.outOfRange ? "font-semibold text-amber-800 dark:text-amber-300" : ""}`}>{fmt(c.outOfRange)}</td>
                <td className="px-3 py-1.5 text-ink-muted">{c.converted ?? "-"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>

      {report.overlap ? (
        <p className="text-ink-muted">
          Overlap with stored data: {fmt(report.overlap.existingRows)} half-hours between {when(report.overlap.from)} and {when(report.overlap.to)}
          {report.written?.choice ? ` - ${report.written.choice === "replace" ? "replaced by this file" : "stored values kept"}.` : "."}
        </p>
      ) : null}

      {report.warnings.length > 0 ? (
        <div>
          <h4 className="mb-1 font-medium">Notes from the reader</h4>
          <ul className="list-disc space-y-1 pl-5 text-ink-muted">
            {report.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </div>
      ) : null}

      {report.ignored.length > 0 ? (
        <details>
          <summary className="cursor-pointer font-medium">{report.ignored.length} columns not read</summary>
          <ul className="mt-1 space-y-0.5 pl-5 text-ink-muted">
            {report.ignored.map((i) => (
              <li key={i.header}>
                <span className="font-mono text-xs">{i.header}</span>: {i.reason}
              </li>
            ))}
          </ul>
        </details>
      ) : null}

      <div>
        <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
          <h4 className="font-medium">
            Rejected cells: {fmt(report.rejectedTotal)}
            <span className="ml-2 font-normal text-ink-muted">(stored as missing; nothing is invented)</span>
          </h4>
          {report.rejectedTotal > 0 ? (
            <a href={rejectedHref} className="btn-quiet" download>
              Download the full list (CSV)
            </a>
          ) : null}
        </div>
        {report.rejectedSample.length > 0 ? (
          <div className="max-h-72 overflow-auto rounded-lg border border-line">
            <table className="min-w-full text-left text-xs">
              <thead className="sticky top-0 bg-surface-sunken text-ink-muted">
                <tr>
                  <th scope="col" className="px-3 py-1.5">Line</th>
                  <th scope="col" className="px-3 py-1.5">Column</th>
                  <th scope="col" className="px-3 py-1.5">Value</th>
                  <th scope="col" className="px-3 py-1.5">Why</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line">
                {report.rejectedSample.map((r, i) => (
                  <tr key={`${r.row}-${r.column}-${i}`}>
                    <td className="px-3 py-1 tabular-nums">{r.row}</td>
                    <td className="px-3 py-1 font-mono">{r.column}</td>
                    <td className="max-w-48 truncate px-3 py-1 font-mono">{r.value}</td>
                    <td className="px-3 py-1">{r.reason}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : null}
      </div>
    </div>
  );
}

function Fact({ label, value }: { label: string; value: string }) {
  return (
    <div>
      <dt className="text-xs text-ink-muted">{label}</dt>
      <dd className="font-medium tabular-nums">{value}</dd>
    </div>
  );
}
