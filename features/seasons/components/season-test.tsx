import { LABEL_META } from "@/lib/ui/label-badge";
import type { SeasonReport } from "@/features/seasons/schemas";

const fmtP = (p: number) => (p < 0.0001 ? p.toExponential(2) : p.toFixed(4));

/** The chi-square test of independence between label and season, in words and numbers. */
export function SeasonTestPanel({ report }: { report: SeasonReport }) {
  const t = report.test;
  if (!t || t.pValue === null) {
    return <p className="text-sm text-ink-muted">Too few labelled evenings in more than one season to test.</p>;
  }
  const differs = t.pValue < 0.05;
  return (
    <div className="space-y-2 text-sm">
      <p className="text-ink">
        {differs
          ? "The mix of labels differs between seasons more than chance would explain."
          : "No clear difference in the mix of labels between seasons."}
      </p>
      <dl className="grid grid-cols-3 gap-3 font-mono text-xs">
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">χ² statistic</dt>
          <dd className="text-base text-ink">{t.statistic.toFixed(2)}</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">degrees of freedom</dt>
          <dd className="text-base text-ink">{t.df}</dd>
        </div>
        <div className="rounded-lg bg-surface-sunken p-2">
          <dt className="text-ink-muted">p-value</dt>
          <dd className="text-base text-ink">{fmtP(t.pValue)}</dd>
        </div>
      </dl>
      <p className="text-xs text-ink-muted">
        Pearson&apos;s test of independence over {t.n} evenings labelled {t.labels.map((l) => LABEL_META[l].name).join(", ")}
        {" "}(unclassified evenings left out: they reflect data coverage more than weather). Consecutive evenings are not
        independent, so read the p-value as a guide.
        {t.smallExpectedShare > 0.2 ? " More than a fifth of the expected counts are below 5; the test is rough here." : ""}
      </p>
    </div>
  );
}
