/**
 * Anomaly screen and u* threshold on a 20-year SYNTHETIC site (lib/synthetic) with three tracer
 * series plus CO2 and FC (~350,000 half-hours, ~7,300 evenings), injected post-sunset rises and
 * a known u* threshold. Times the pure work of the anomalies job: day grid, screening of five
 * series, night mask, seasonal thresholds with 100 bootstrap resamples, weak-turbulence flags.
 * Target: under 10 s in all. Prints figures only.
 */
import { performance } from "node:perf_hooks";
import { DayGrid, detectOnGrid } from "@/lib/anomalies/detect";
import { anomalySettingsOf } from "@/lib/anomalies/settings";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import type { SiteParams } from "@/lib/classify/site";
import { eveningSun } from "@/lib/physics/sun";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { weakTurbulenceByEvening } from "@/lib/ustar/flags";
import { nightMask } from "@/lib/ustar/night";
import { seasonOfDate } from "@/lib/ustar/seasons";
import { ustarThresholds } from "@/lib/ustar/threshold";

const YEARS = 20;
const SITE: SiteParams = {
  latitudeDeg: 46.9,
  longitudeDeg: 7.64,
  elevationM: 780,
  measurementHeightM: 32,
  canopyHeightM: 21,
  utcOffsetHours: 1,
};
const TRACERS = ["O3", "ISOPRENE", "NO2"];

export default async function bench(): Promise<void> {
  const days = Math.round(YEARS * 365.25);
  const injected = Array.from({ length: 100 }, (_, k) => {
    const d = new Date(Date.UTC(2005, 0, 20) + k * 73 * 86_400_000);
    return d.toISOString().slice(0, 10);
  });
  let t = performance.now();
  const g = generateSynthetic({
    site: SITE,
    startDate: "2005-01-01",
    days,
    seed: 2026,
    tracers: TRACERS,
    gapFraction: 0.02,
    injections: injected.map((date) => ({ date, column: "ISOPRENE", amplitude: 25 })),
    ustarThresholdMs: 0.25,
  });
  const evenings = g.truth.map((e) => ({
    date: e.date,
    sunsetMs: eveningSun(e.date, SITE.latitudeDeg, SITE.longitudeDeg, SITE.utcOffsetHours).sunsetMs,
  }));
  console.log(
    `  generated ${g.table.startMs.length} half-hours, ${evenings.length} evenings in ${((performance.now() - t) / 1000).toFixed(1)} s (not timed)`,
  );
  await Promise.resolve();

  const c = g.table.columns;
  const series = ["CO2", "FC", ...TRACERS].map((name) => ({ name, values: c[name] as Float64Array }));
  const settings = anomalySettingsOf(DEFAULT_RULE_SET);
  // CPU time beside wall time: on a shared machine the wall clock also counts other processes.
  let cpu = process.cpuUsage();
  const cpu0 = process.cpuUsage();
  const lap = (label: string, t0: number, since = cpu) => {
    const s = (performance.now() - t0) / 1000;
    const used = process.cpuUsage(since);
    cpu = process.cpuUsage();
    console.log(
      `  ${label.padEnd(34)} ${s.toFixed(2)} s wall, ${((used.user + used.system) / 1e6).toFixed(2)} s cpu`,
    );
    return s;
  };
  const total0 = performance.now();
  t = performance.now();
  const grid = new DayGrid(g.table.startMs, 30, series);
  lap("day grid (5 series)", t);
  t = performance.now();
  const found = detectOnGrid(grid, evenings, settings);
  const screen = lap("screen (5 series x evenings)", t);
  t = performance.now();
  const night = nightMask(g.table.startMs, 30, c.SW_IN, SITE.latitudeDeg, SITE.longitudeDeg);
  lap("night mask", t);
  t = performance.now();
  const u = ustarThresholds({
    startMs: g.table.startMs,
    ustar: c.USTAR as Float64Array,
    flux: c.FC as Float64Array,
    ta: c.TA as Float64Array,
    night,
    utcOffsetHours: 1,
    latitudeDeg: SITE.latitudeDeg,
  });
  lap("u* thresholds, 100 bootstrap", t);
  t = performance.now();
  const annual = new Map(u.annual.map((a) => [a.seasonYear, a.thresholdMs]));
  const flags = weakTurbulenceByEvening(
    g.table.startMs,
    c.USTAR as Float64Array,
    c.FC as Float64Array,
    night,
    evenings.map((e) => e.sunsetMs),
    (ms) =>
      annual.get(
        seasonOfDate(new Date(ms + 3_600_000).toISOString().slice(0, 10), SITE.latitudeDeg).seasonYear,
      ) ?? null,
  );
  lap("weak-turbulence flags", t);
  const total = lap("TOTAL (target < 10 s)", total0, cpu0);

  const rises = new Set(
    found.filter((a) => a.series === "ISOPRENE" && a.kind === "rise-after-sunset").map((a) => a.date),
  );
  const hit = injected.filter((d) => rises.has(d)).length;
  const thresholds = u.annual.map((a) => a.thresholdMs).filter((v): v is number => v !== null);
  const err = Math.max(...thresholds.map((v) => Math.abs(v - 0.25)));
  console.log(
    `  ${found.length} anomalies (${((evenings.length * series.length) / screen / 1000).toFixed(0)}k evening-series/s); injected rises found ${hit}/${injected.length}`,
  );
  console.log(
    `  annual u* thresholds ${thresholds.length}, largest error vs the known 0.25 m/s: ${err.toFixed(3)} m/s; weak-turbulence nights ${flags.filter((f) => f.weakPeriods > 0).length}`,
  );
  const cpuTotal = (() => {
    const u = process.cpuUsage(cpu0);
    return (u.user + u.system) / 1e6;
  })();
  console.log(
    `  wall ${total < 10 ? "within" : "OVER"} the 10 s target; cpu ${cpuTotal < 10 ? "within" : "OVER"} it (load average ${(await import("node:os")).loadavg()[0]?.toFixed(1)})`,
  );
}
