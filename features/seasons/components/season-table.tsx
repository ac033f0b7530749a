import { LABEL_ORDER, LabelBadge } from "@/lib/ui/label-badge";
import type { SeasonReport } from "@/features/seasons/schemas";
import { overallCells } from "@/features/seasons/report-rows";

/** The numbers behind the charts: per year and season, then all years. */
export function SeasonTable({ report }: { report: SeasonReport }) {
  const name = new Map(report.categories.map((c) => [c.key, c.name]));
  // seasons of a year with no evenings at all (outside the period) would only be noise
  const rows = [...overallCells(report, "each").filter((c) => c.total > 0), ...overallCells(report, "all")];
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[36rem] text-sm tabular-nums">
        <caption className="sr-only">Evenings per label, season and year</caption>
        <thead>
          <tr className="border-b border-line text-left text-xs text-ink-muted">
            <th scope="col" className="py-2 pr-3 font-medium">Year</th>
            <th scope="col" className="py-2 pr-3 font-medium">Season</th>
            {LABEL_ORDER.map((l) => (
              <th key={l} scope="col" className="py-2 pr-3 text-right font-medium">
                <span className="inline-flex justify-end"><LabelBadge label={l} /></span>
              </th>
            ))}
            <th scope="col" className="py-2 text-right font-medium">Total</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((c) => (
            <tr
              key={`${c.year ?? "all"}-${c.category}`}
              className={`border-b border-line/60 ${c.year === null ? "bg-surface-sunken font-semibold" : ""}`}
            >
              <td className="py-1.5 pr-3">{c.year ?? "All years"}</td>
              <td className="py-1.5 pr-3">{name.get(c.category) ?? c.category}</td>
              {LABEL_ORDER.map((l) => (
                <td key={l} className="py-1.5 pr-3 text-right">
                  {c.counts[l]}
                </td>
              ))}
              <td className="py-1.5 text-right">{c.total}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
