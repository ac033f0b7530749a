import { expect, test } from "vitest";
import { detectAnomalies } from "@/lib/anomalies/detect";
import { anomalySettingsOf } from "@/lib/anomalies/settings";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import { DEMO_SITE } from "@/lib/demo/scenario";
import { eveningSun } from "@/lib/physics/sun";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { nightMask } from "@/lib/ustar/night";
import { ustarThresholds } from "@/lib/ustar/threshold";
import { db } from "@/lib/db/knex";
import { DEMO_GROUP_NAME } from "@/lib/demo/scenario";
import { listAnomalies, ustarThresholdsForSite, weakTurbulenceForSite } from "@/lib/anomalies/server/queries";
import {
  DEMO_INJECTED_RISES,
  DEMO_USTAR_THRESHOLD_MS,
  demoSyntheticOptions,
  seedDemoData,
} from "@/db/seeds/02_demo_data";

test("the demo scenario's SYNTHETIC data: every injected rise is found and the built-in u* threshold recovered", () => {
  const site = {
    latitudeDeg: DEMO_SITE.latitude,
    longitudeDeg: DEMO_SITE.longitude,
    elevationM: DEMO_SITE.elevation_m,
    measurementHeightM: DEMO_SITE.measurement_height_m,
    canopyHeightM: DEMO_SITE.canopy_height_m,
    utcOffsetHours: DEMO_SITE.utc_offset_hours,
  };
  const g = generateSynthetic(demoSyntheticOptions(site));
  const c = g.table.columns;
  const evenings = g.truth.map((t) => ({
    date: t.date,
    sunsetMs: eveningSun(t.date, site.latitudeDeg, site.longitudeDeg, site.utcOffsetHours).sunsetMs,
  }));
  const found = detectAnomalies(
    g.table.startMs,
    30,
    [{ name: "ISOPRENE", values: c.ISOPRENE as Float64Array }],
    evenings,
    anomalySettingsOf(DEFAULT_RULE_SET),
  );
  const rises = new Set(found.filter((a) => a.kind === "rise-after-sunset").map((a) => a.date));
  for (const d of DEMO_INJECTED_RISES) expect(rises.has(d), d).toBe(true);

  const night = nightMask(g.table.startMs, 30, c.SW_IN, site.latitudeDeg, site.longitudeDeg);
  const u = ustarThresholds(
    {
      startMs: g.table.startMs,
      ustar: c.USTAR as Float64Array,
      flux: c.FC as Float64Array,
      ta: c.TA as Float64Array,
      night,
      utcOffsetHours: site.utcOffsetHours,
      latitudeDeg: site.latitudeDeg,
    },
    { bootstrap: 10 },
  );
  for (const year of [2023, 2024]) {
    const annual = u.annual.find((a) => a.seasonYear === year);
    expect(Math.abs((annual?.thresholdMs ?? 0) - DEMO_USTAR_THRESHOLD_MS), String(year)).toBeLessThan(0.05);
  }
}, 120_000);

test(
  "after seeding, the demo site's stored anomalies and thresholds agree with that truth",
  { timeout: 300_000 },
  async () => {
    await seedDemoData(db);
    const group = await db("research_groups").where({ name: DEMO_GROUP_NAME }).first("id");
    const site = await db("sites")
      .where({ group_id: group?.id ?? -1, name: DEMO_SITE.name })
      .first("id");
    const siteId = site?.id ?? -1;
    const { anomalies } = await listAnomalies(
      siteId,
      { series: "ISOPRENE", kind: "rise-after-sunset" },
      { limit: 1000 },
    );
    const dates = new Set(anomalies.map((a) => a.eveningDate));
    for (const d of DEMO_INJECTED_RISES) expect(dates.has(d), d).toBe(true);
    const year = (await ustarThresholdsForSite(siteId)).filter(
      (t) => t.season === "year" && t.seasonYear <= 2024,
    );
    expect(year.map((t) => t.seasonYear)).toEqual([2023, 2024]);
    for (const t of year) expect(Math.abs((t.thresholdMs ?? 0) - DEMO_USTAR_THRESHOLD_MS)).toBeLessThan(0.05);
    const weak = await weakTurbulenceForSite(siteId, { label: "stagnant" });
    expect(weak.total).toBeGreaterThan(100);
  },
);
