import { ANOMALY_KINDS } from "@/lib/anomalies/detect";
import { LABEL_META, LABEL_ORDER } from "@/lib/ui/label-badge";
import { SEASONS } from "@/lib/ustar/seasons";
import { KIND_NAMES, SEASON_NAMES, type AnomalyFiltersInput } from "@/features/anomalies/schemas";

/** Filters as a plain GET form: works without JavaScript and keeps the filter in the address. */
export function AnomalyFilters({ series, value }: { series: string[]; value: AnomalyFiltersInput }) {
  const select = (
    name: string,
    label: string,
    current: string | undefined,
    options: Array<[string, string]>,
  ) => (
    <label className="flex flex-col gap-1 text-xs text-ink-muted">
      {label}
      <select name={name} defaultValue={current ?? ""} className="field-input py-1 text-sm">
        <option value="">All</option>
        {options.map(([v, text]) => (
          <option key={v} value={v}>
            {text}
          </option>
        ))}
      </select>
    </label>
  );
  return (
    <form method="get" className="flex flex-wrap items-end gap-3" aria-label="Filter anomalies">
      {select(
        "series",
        "Series",
        value.series,
        series.map((s) => [s, s]),
      )}
      {select(
        "kind",
        "Kind",
        value.kind,
        ANOMALY_KINDS.map((k) => [k, KIND_NAMES[k]]),
      )}
      {select(
        "label",
        "Evening label",
        value.label,
        LABEL_ORDER.map((l) => [l, LABEL_META[l].name]),
      )}
      {select(
        "season",
        "Season",
        value.season,
        SEASONS.map((s) => [s, SEASON_NAMES[s]]),
      )}
      <button type="submit" className="btn-quiet">
        Apply
      </button>
    </form>
  );
}
