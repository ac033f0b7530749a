import { LABEL_ORDER } from "@/lib/ui/label-badge";
import type { SeasonCell, SeasonReport } from "@/features/seasons/schemas";

/** The cells of the chosen sites together (or of the one site), per year or for all years. */
export function overallCells(r: SeasonReport, year: "all" | "each"): SeasonCell[] {
  const siteId = r.sites.length > 1 ? null : (r.sites[0]?.id ?? null);
  return r.cells.filter((c) => c.siteId === siteId && (year === "all" ? c.year === null : c.year !== null));
}

/** Header and rows of the season table as CSV: every site, year and season, then totals. */
export function csvRows(r: SeasonReport): Array<Array<string | number | null>> {
  const name = new Map(r.sites.map((s) => [s.id, s.name]));
  const cat = new Map(r.categories.map((c) => [c.key, c.name]));
  const header = ["site", "hemisphere", "year", "season", ...LABEL_ORDER, "total", "labels"];
  const rows = r.cells.map((c) => [
    c.siteId === null ? "all chosen sites" : (name.get(c.siteId) ?? String(c.siteId)),
    c.siteId === null ? null : (r.sites.find((s) => s.id === c.siteId)?.hemisphere ?? null),
    c.year === null ? "all years" : c.year,
    cat.get(c.category) ?? c.category,
    ...LABEL_ORDER.map((l) => c.counts[l]),
    c.total,
    r.labels === "final" ? "final (overrides on top)" : "automatic",
  ]);
  return [header, ...rows];
}
