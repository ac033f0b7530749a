/*
 * Synthetic tower data (lib/synthetic, invented) written into half_hours, then classified with
 * lib/evenings/recompute, so rule tests start from evenings as the product stores them.
 */
import { db } from "@/lib/db/knex";
import type { InsertRow } from "@/lib/db/tables";
import { MEASURE_COLUMNS } from "@/lib/evenings/load";
import { recomputeEvenings } from "@/lib/evenings/recompute";
import { ensureActiveRuleSet } from "@/lib/evenings/rulesets";
import { generateSynthetic } from "@/lib/synthetic/generator";
import type { SiteRow } from "@/tests/support/db";

/** Writes `days` of synthetic half-hours from `startDate` and classifies them with the site's active rules. */
export async function towerWithEvenings(site: SiteRow, startDate: string, days: number, seed = 7): Promise<void> {
  const { table } = generateSynthetic({
    site: {
      latitudeDeg: site.latitude,
      longitudeDeg: site.longitude,
      elevationM: site.elevation_m,
      measurementHeightM: site.measurement_height_m,
      canopyHeightM: site.canopy_height_m,
      displacementHeightM: site.displacement_height_m,
      utcOffsetHours: Number(site.utc_offset_hours),
    },
    startDate,
    days,
    seed,
  });
  const rows: Array<Record<string, unknown>> = [];
  for (let i = 0; i < table.startMs.length; i++) {
    const row: Record<string, unknown> = { site_id: site.id, start_utc: new Date(table.startMs[i] ?? 0) };
    for (const [variable, column] of Object.entries(MEASURE_COLUMNS)) {
      const v = table.columns[variable]?.[i];
      row[column] = v === undefined || Number.isNaN(v) ? null : v;
    }
    rows.push(row);
  }
  for (let i = 0; i < rows.length; i += 1000) await db("half_hours").insert(rows.slice(i, i + 1000) as Array<InsertRow<"half_hours">>);
  await ensureActiveRuleSet(site.id);
  const last = new Date(Date.parse(`${startDate}T00:00:00Z`) + (days - 1) * 86_400_000).toISOString().slice(0, 10);
  await recomputeEvenings(site.id, startDate, last);
}
