import { LABEL_META } from "@/lib/ui/label-badge";
import type { EveningDetail, HistoryEntry, ThresholdRow } from "@/features/review/schemas";
import { METRIC_NAMES_READABLE } from "@/features/review/thresholds";
import type { MetricName } from "@/lib/classify/rules";

function num(v: number | null): string {
  if (v === null || !Number.isFinite(v)) return "—";
  const a = Math.abs(v);
  return a >= 100 ? v.toFixed(0) : a >= 10 ? v.toFixed(1) : a >= 1 ? v.toFixed(2) : v.toPrecision(2);
}

function unit(u: string): string {
  return u === "ratio" || u === "z/L" ? "" : ` ${u}`;
}

/** The metrics beside the thresholds of the rule set that labelled the evening. */
export function ThresholdTable({ rows, rule, ruleDescription }: { rows: ThresholdRow[]; rule: string | null; ruleDescription: string | null }) {
  const sorted = [...rows].sort((a, b) => Number(b.deciding) - Number(a.deciding));
  return (
    <div className="space-y-3">
      <p className="text-sm">
        {rule ? (
          <>
            Decided by rule <code className="rounded bg-surface-sunken px-1.5 py-0.5 font-mono text-xs">{rule}</code>
            {ruleDescription ? <span className="text-ink-muted"> — {ruleDescription}</span> : null}
          </>
        ) : (
          <span className="text-ink-muted">No rule decided this evening.</span>
        )}
      </p>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[32rem] text-sm">
          <caption className="sr-only">Metrics against thresholds; margin is positive when the condition holds</caption>
          <thead>
            <tr className="border-b border-line text-left text-xs text-ink-muted">
              <th scope="col" className="py-2 pr-3 font-medium">Threshold</th>
              <th scope="col" className="py-2 pr-3 font-medium">Metric</th>
              <th scope="col" className="py-2 pr-3 text-right font-medium">Value</th>
              <th scope="col" className="py-2 pr-3 text-center font-medium">Condition</th>
              <th scope="col" className="py-2 text-right font-medium">Margin</th>
            </tr>
          </thead>
          <tbody>
            {sorted.map((r) => {
              const holds = r.margin !== null && r.margin > 0;
              return (
                <tr key={r.name} className={`border-b border-line last:border-0 ${r.deciding ? "bg-dusk-50/70 dark:bg-dusk-900/40" : ""}`}>
                  <th scope="row" className="py-2 pr-3 text-left font-normal">
                    <span className="font-mono text-xs">{r.name}</span>
                    {r.deciding ? (
                      <span className="ml-2 rounded bg-dusk-600 px-1.5 py-0.5 text-[10px] font-semibold text-white dark:bg-dusk-300 dark:text-dusk-950">deciding</span>
                    ) : null}
                    {r.description ? <span className="block text-xs text-ink-muted">{r.description}</span> : null}
                    <span className="block text-[11px] text-ink-muted">
                      used by <span className="font-mono">{r.rules.join(", ") || "no rule"}</span>
                    </span>
                  </th>
                  <td className="py-2 pr-3">{METRIC_NAMES_READABLE[r.metric as MetricName] ?? r.metric}</td>
                  <td className="py-2 pr-3 text-right font-mono tabular-nums">
                    {num(r.value)}
                    {r.value !== null ? unit(r.unit) : ""}
                  </td>
                  <td className="py-2 pr-3 text-center font-mono text-xs whitespace-nowrap">
                    {r.op === "below" ? "<" : ">"} {num(r.threshold)}
                    {r.threshold !== null ? unit(r.unit) : ""}
                  </td>
                  <td className="py-2 text-right font-mono tabular-nums whitespace-nowrap">
                    {r.margin === null ? (
                      <span className="text-ink-muted">n/a</span>
                    ) : (
                      <>
                        <span aria-hidden="true">{holds ? "✓ " : "✗ "}</span>
                        {r.margin > 0 ? "+" : ""}
                        {num(r.margin)}
                        <span className="sr-only">{holds ? " (holds)" : " (does not hold)"}</span>
                      </>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}

function when(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

function LabelName({ label }: { label: HistoryEntry["toLabel"] }) {
  if (!label) return <span>—</span>;
  return (
    <span className="inline-flex items-center gap-1">
      <span aria-hidden="true" className={`inline-grid size-4 place-items-center rounded-sm font-mono text-[9px] font-bold ${LABEL_META[label].swatch}`}>
        {LABEL_META[label].glyph}
      </span>
      <strong className="font-medium">{LABEL_META[label].name}</strong>
    </span>
  );
}

/** The append-only history, oldest first, in full. */
export function HistoryList({ entries, evening }: { entries: HistoryEntry[]; evening: EveningDetail["evening"] }) {
  return (
    <ol className="space-y-3" aria-label="History of this evening">
      {entries.length === 0 ? (
        <li className="text-sm text-ink-muted">
          Labelled <LabelName label={evening.autoLabel} /> by the rules
          {evening.ruleSetVersion ? ` (rule set v${evening.ruleSetVersion})` : ""} on {when(evening.computedAt)}.
        </li>
      ) : null}
      {entries.map((h) => (
        <li key={h.id} className="relative border-l-2 border-line pl-4 text-sm">
          <span aria-hidden="true" className="absolute top-1 -left-[5px] size-2 rounded-full bg-dusk-500" />
          <p>
            {h.kind === "auto" ? (
              <>
                Rules: {h.fromLabel ? <><LabelName label={h.fromLabel} /> → </> : null}
                <LabelName label={h.toLabel} />
                {h.ruleSetVersion ? <span className="text-ink-muted"> · rule set v{h.ruleSetVersion}</span> : null}
              </>
            ) : h.kind === "override" ? (
              <>
                Override: <LabelName label={h.fromLabel} /> → <LabelName label={h.toLabel} />
              </>
            ) : h.kind === "revert" ? (
              <>
                Reverted to the automatic label: <LabelName label={h.fromLabel} /> → <LabelName label={h.toLabel} />
              </>
            ) : (
              <>Marked reviewed</>
            )}
          </p>
          <p className="text-xs text-ink-muted">
            {h.user ?? (h.kind === "auto" ? "classifier" : "unknown")} · <time dateTime={h.at}>{when(h.at)}</time>
          </p>
          {h.note ? <blockquote className="mt-1 rounded-md bg-surface-sunken px-3 py-2 text-sm whitespace-pre-line">{h.note}</blockquote> : null}
        </li>
      ))}
    </ol>
  );
}
