import type { SeasonQuery } from "@/features/seasons/schemas";

/**
 * The seasons page's choices as a plain GET form: it works without JavaScript and the URL
 * holds the whole question, so a view can be bookmarked or sent to a colleague.
 */
export function SeasonControls({
  sites,
  query,
  errors,
}: {
  sites: Array<{ id: number; name: string; latitude: number }>;
  query: Partial<SeasonQuery>;
  errors?: string[];
}) {
  const chosen = new Set(query.sites ?? []);
  return (
    <form method="get" className="card grid gap-4 p-5 md:grid-cols-[minmax(0,1.4fr)_minmax(0,1fr)_minmax(0,1fr)]">
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium text-ink">Sites</legend>
        <div className="max-h-36 space-y-1 overflow-y-auto">
          {sites.map((s) => (
            <label key={s.id} className="flex items-center gap-2 text-sm">
              <input type="checkbox" name="site" value={s.id} defaultChecked={chosen.has(s.id)} className="size-4 accent-dusk-600" />
              <span>{s.name}</span>
              <span className="font-mono text-xs text-ink-muted">{s.latitude < 0 ? "S" : "N"} hemisphere</span>
            </label>
          ))}
        </div>
      </fieldset>
      <div className="space-y-3">
        <div className="grid grid-cols-2 gap-2">
          <label className="space-y-1 text-sm">
            <span className="block font-medium">From</span>
            <input type="date" name="from" defaultValue={query.from ?? ""} className="field-input" />
          </label>
          <label className="space-y-1 text-sm">
            <span className="block font-medium">To</span>
            <input type="date" name="to" defaultValue={query.to ?? ""} className="field-input" />
          </label>
        </div>
        <fieldset className="space-y-1 text-sm">
          <legend className="font-medium">Labels</legend>
          <label className="mr-4 inline-flex items-center gap-2">
            <input type="radio" name="labels" value="final" defaultChecked={query.labels !== "auto"} className="accent-dusk-600" /> Final (overrides on top)
          </label>
          <label className="inline-flex items-center gap-2">
            <input type="radio" name="labels" value="auto" defaultChecked={query.labels === "auto"} className="accent-dusk-600" /> Automatic only
          </label>
        </fieldset>
      </div>
      <div className="space-y-3">
        <label className="block space-y-1 text-sm">
          <span className="block font-medium">Group evenings by</span>
          <select name="scheme" defaultValue={query.scheme ?? "meteorological"} className="field-input">
            <option value="meteorological">Meteorological season</option>
            <option value="month">Month</option>
            <option value="custom">A season of our own (dates below)</option>
          </select>
        </label>
        <div className="grid grid-cols-[minmax(0,1fr)_4.5rem_4.5rem] gap-2">
          <label className="space-y-1 text-xs">
            <span className="block text-ink-muted">Season name</span>
            <input name="seasonName" defaultValue={query.seasonName ?? "Growing season"} className="field-input" />
          </label>
          <label className="space-y-1 text-xs">
            <span className="block text-ink-muted">Starts (MM-DD)</span>
            <input name="seasonStart" defaultValue={query.seasonStart ?? "04-01"} pattern="\d{2}-\d{2}" className="field-input" />
          </label>
          <label className="space-y-1 text-xs">
            <span className="block text-ink-muted">Ends (MM-DD)</span>
            <input name="seasonEnd" defaultValue={query.seasonEnd ?? "09-30"} pattern="\d{2}-\d{2}" className="field-input" />
          </label>
        </div>
      </div>
      <div className="flex flex-wrap items-center gap-3 md:col-span-3">
        <button type="submit" className="btn-primary">
          Count evenings
        </button>
        {errors?.length ? (
          <p role="alert" className="text-sm text-red-700 dark:text-red-300">
            {errors.join(" ")}
          </p>
        ) : null}
      </div>
    </form>
  );
}
