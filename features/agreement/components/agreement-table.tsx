import Link from "next/link";
import { LABEL_META, LabelBadge } from "@/lib/ui/label-badge";
import type { AgreementReport } from "@/features/agreement/schemas";

const pct = (v: number) => `${(100 * v).toFixed(1)} %`;

/**
 * Automatic (rows) against final (columns) labels. Each count links to the list of its evenings;
 * `cellHref` builds that link so the page decides where the list lives.
 */
export function AgreementTable({
  report,
  cellHref,
  selected,
}: {
  report: AgreementReport;
  cellHref: (auto: string, final: string) => string;
  selected?: { auto?: string; final?: string };
}) {
  return (
    <div className="space-y-4">
      <dl className="grid grid-cols-3 gap-3 font-mono text-xs">
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">evenings</dt>
          <dd className="text-base text-ink">{report.n}</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">overall agreement</dt>
          <dd className="text-base text-ink">{report.n ? pct(report.observed) : "–"}</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">Cohen&apos;s κ</dt>
          <dd className="text-base text-ink">{report.kappa === null ? "–" : report.kappa.toFixed(3)}</dd>
        </div>
      </dl>
      <div className="overflow-x-auto">
        <table className="text-sm tabular-nums">
          <caption className="mb-1 text-left text-xs text-ink-muted">Rows: automatic label. Columns: final label (the analyst&apos;s where overridden).</caption>
          <thead>
            <tr>
              <th scope="col" className="p-1.5" />
              {report.labels.map((l) => (
                <th key={l} scope="col" className="p-1.5 text-right font-medium">
                  <LabelBadge label={l} compact />
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {report.labels.map((a, i) => (
              <tr key={a}>
                <th scope="row" className="p-1.5 text-left font-medium">
                  <LabelBadge label={a} />
                </th>
                {report.labels.map((f, j) => {
                  const n = report.counts[i]?.[j] ?? 0;
                  const on = selected?.auto === a && selected.final === f;
                  const diag = i === j;
                  return (
                    <td key={f} className={`p-1 text-right ${diag ? "bg-surface-sunken" : ""}`}>
                      {n > 0 ? (
                        <Link
                          href={cellHref(a, f)}
                          aria-label={`${n} evenings: automatic ${LABEL_META[a].name}, final ${LABEL_META[f].name}`}
                          className={`inline-block min-w-10 rounded px-2 py-1 hover:bg-dusk-100 dark:hover:bg-dusk-800 ${on ? "ring-2 ring-dusk-500" : ""} ${diag ? "" : "font-semibold"}`}
                        >
                          {n}
                        </Link>
                      ) : (
                        <span className="inline-block min-w-10 px-2 py-1 text-ink-muted">0</span>
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-ink-muted">
        κ corrects the agreement for what the two label mixes would share by chance (Cohen 1960). {report.overrides} evenings carry an override.
      </p>
    </div>
  );
}
