import type { SiteParams } from "@/lib/classify/site";
import { db } from "@/lib/db/knex";
import type { InsertRow } from "@/lib/db/tables";
import { MEASURE_COLUMNS } from "@/lib/evenings/load";
import type { HalfHourTable, KnownVariable } from "@/lib/series/types";
import type { SiteRow } from "@/tests/support/db";

/** The classifier's view of a site row. */
export function paramsOf(site: SiteRow): SiteParams {
  return {
    latitudeDeg: site.latitude,
    longitudeDeg: site.longitude,
    elevationM: site.elevation_m,
    measurementHeightM: site.measurement_height_m,
    canopyHeightM: site.canopy_height_m,
    displacementHeightM: site.displacement_height_m,
    utcOffsetHours: Number(site.utc_offset_hours),
  };
}

/**
 * Writes a table into half_hours as an import would (NaN -> NULL); tracers go to the slots given
 * and are named in site_series.
 */
export async function storeTable(siteId: number, table: HalfHourTable, tracers: Record<string, number> = {}): Promise<void> {
  for (const [name, slot] of Object.entries(tracers)) {
    await db("site_series").insert({ site_id: siteId, slot, name, unit: table.units[name] ?? "nmol mol-1", kind: "concentration" });
  }
  const cols: Array<[string, Float64Array]> = [];
  for (const [v, c] of Object.entries(MEASURE_COLUMNS)) {
    const a = table.columns[v as KnownVariable];
    if (a) cols.push([c, a]);
  }
  for (const [name, slot] of Object.entries(tracers)) {
    const a = table.columns[name];
    if (a) cols.push([`tracer_${slot}`, a]);
  }
  const n = table.startMs.length;
  for (let i = 0; i < n; i += 1000) {
    const rows = [];
    for (let k = i; k < Math.min(n, i + 1000); k++) {
      const row: Record<string, number | Date | null> = { site_id: siteId, start_utc: new Date(table.startMs[k] as number) };
      for (const [c, a] of cols) {
        const v = a[k] as number;
        row[c] = Number.isFinite(v) ? v : null;
      }
      rows.push(row);
    }
    await db("half_hours").insert(rows as Array<InsertRow<"half_hours">>);
  }
}
