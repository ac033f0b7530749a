/**
 * The export choices as a plain GET form on the export endpoint: the browser downloads the zip
 * itself (streamed), and the same URL works for scripts with an API token.
 */
export function ExportForm({ siteId, from, to }: { siteId: number; from: string | null; to: string | null }) {
  if (!from || !to) {
    return <p className="card p-5 text-sm text-ink-muted italic">No evenings at this site yet: import data first.</p>;
  }
  return (
    <form method="get" action={`/api/sites/${siteId}/export`} className="card space-y-5 p-5">
      <div className="grid gap-4 sm:grid-cols-2">
        <label className="space-y-1.5 text-sm">
          <span className="block font-medium">First evening</span>
          <input type="date" name="from" required defaultValue={from} min={from} max={to} className="field-input" />
        </label>
        <label className="space-y-1.5 text-sm">
          <span className="block font-medium">Last evening</span>
          <input type="date" name="to" required defaultValue={to} min={from} max={to} className="field-input" />
        </label>
      </div>
      <label className="flex items-start gap-3 text-sm">
        <input type="checkbox" name="halfHours" value="1" className="mt-0.5 size-4 accent-dusk-600" />
        <span>
          <span className="block font-medium">Include every half-hour</span>
          <span className="text-ink-muted">Each period with its evening&apos;s label (evenings run from local noon to noon). Larger file.</span>
        </span>
      </label>
      <ul className="space-y-1 text-xs text-ink-muted">
        <li>evenings.csv: date, site, label, source (automatic or override), note, rule-set version, metrics</li>
        <li>provenance.json: site, rule-set versions and thresholds, source files with SHA-256, software version, who exported and when</li>
        <li>Dates are ISO 8601 on the data clock with its UTC offset stated.</li>
      </ul>
      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" className="btn-primary">
          Download zip
        </button>
        <code className="font-mono text-xs break-all text-ink-muted">
          GET /api/sites/{siteId}/export?from=…&amp;to=…[&amp;halfHours=1]
        </code>
      </div>
    </form>
  );
}
