/*
 * Seeds a test site with SYNTHETIC half-hours (lib/synthetic, with injected post-sunset rises
 * and a known u* threshold) and evening rows labelled with the generator's truth, so the anomaly
 * job can run without the import pipeline.
 */
import { db } from "@/lib/db/knex";
import { eveningSun } from "@/lib/physics/sun";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { createSiteFor } from "@/tests/support/db";

export const SEED_SITE = {
  latitude: 46.9,
  longitude: 7.64,
  elevation_m: 780,
  measurement_height_m: 32,
  canopy_height_m: 21,
  utc_offset_hours: 1,
};
export const KNOWN_USTAR_THRESHOLD = 0.25;

export async function seedSyntheticSite(
  groupId: number,
  opts: { startDate: string; days: number; injected: string[] },
) {
  const site = await createSiteFor(groupId, SEED_SITE);
  const params = {
    latitudeDeg: SEED_SITE.latitude,
    longitudeDeg: SEED_SITE.longitude,
    elevationM: SEED_SITE.elevation_m,
    measurementHeightM: SEED_SITE.measurement_height_m,
    canopyHeightM: SEED_SITE.canopy_height_m,
    utcOffsetHours: 1,
  };
  const g = generateSynthetic({
    site: params,
    startDate: opts.startDate,
    days: opts.days,
    seed: 99,
    tracers: ["O3", "ISOPRENE"],
    injections: opts.injected.map((date) => ({ date, column: "ISOPRENE", amplitude: 25 })),
    ustarThresholdMs: KNOWN_USTAR_THRESHOLD,
  });
  await db("site_series").insert([
    { site_id: site.id, slot: 1, name: "O3", unit: "nmol mol-1", kind: "concentration" },
    { site_id: site.id, slot: 2, name: "ISOPRENE", unit: "nmol mol-1", kind: "concentration" },
  ]);
  const c = g.table.columns;
  const v = (a: Float64Array | undefined, i: number) => {
    const x = a?.[i];
    return x === undefined || Number.isNaN(x) ? null : x;
  };
  const rows = Array.from(g.table.startMs, (t, i) => ({
    site_id: site.id,
    start_utc: new Date(t),
    ustar: v(c.USTAR, i),
    fc: v(c.FC, i),
    co2: v(c.CO2, i),
    sw_in: v(c.SW_IN, i),
    ta: v(c.TA, i),
    ws: v(c.WS, i),
    tracer_1: v(c.O3, i),
    tracer_2: v(c.ISOPRENE, i),
  }));
  for (let i = 0; i < rows.length; i += 2000) await db("half_hours").insert(rows.slice(i, i + 2000));
  const evenings = g.truth.map((t) => {
    const sun = eveningSun(t.date, params.latitudeDeg, params.longitudeDeg, 1);
    return {
      site_id: site.id,
      local_date: t.date,
      sunset_utc: sun.sunsetMs === null ? null : new Date(sun.sunsetMs),
      civil_dusk_utc: null,
      auto_label: t.kind,
      final_label: t.kind,
      rule: null,
      reasons: "[]",
      margins: "{}",
      metrics: "{}",
    };
  });
  for (let i = 0; i < evenings.length; i += 500) await db("evenings").insert(evenings.slice(i, i + 500));
  return { site, truth: g.truth };
}
