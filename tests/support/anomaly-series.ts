/*
 * Test-only SYNTHETIC series for the anomaly screen and the u* threshold: smooth daily cycles
 * with Gaussian noise and known, injected truth. Nothing here is a measurement.
 */
import { eveningSun, localDateOf, localMidnightUtcMs } from "@/lib/physics/sun";
import type { EveningRef } from "@/lib/anomalies/detect";

export const TEST_SITE = { latitudeDeg: 46.9, longitudeDeg: 7.64, utcOffsetHours: 1 };

/** Seeded uniform [0, 1) (mulberry32). */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Seeded standard normal (Box-Muller). */
export function normal(rand: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(Math.max(1e-12, rand()))) * Math.cos(2 * Math.PI * rand());
}

export interface InjectedEvent {
  date: string;
  /** added to the series, unit of the series */
  amplitude: number;
  /** hours after sunset the excursion starts and ends (default 0.5..2.5) */
  fromH?: number;
  toH?: number;
}

export interface CleanSeries {
  startMs: Float64Array;
  values: Float64Array;
  evenings: EveningRef[];
}

/**
 * Half-hourly series over `days` local days from `startDate`: a daily cycle (amplitude 10 about
 * a level of 40) plus N(0, noiseSd) noise, with the given events added after sunset.
 */
export function cleanSeries(opts: {
  startDate: string;
  days: number;
  seed: number;
  noiseSd?: number;
  events?: InjectedEvent[];
}): CleanSeries {
  const { latitudeDeg, longitudeDeg, utcOffsetHours } = TEST_SITE;
  const n = opts.days * 48;
  const t0 = localMidnightUtcMs(opts.startDate, utcOffsetHours);
  const startMs = new Float64Array(n);
  const values = new Float64Array(n);
  const gauss = normal(seeded(opts.seed));
  const evenings: EveningRef[] = [];
  for (let d = 0; d < opts.days; d++) {
    const date = localDateOf(t0 + d * 86_400_000 + 43_200_000, utcOffsetHours);
    evenings.push({ date, sunsetMs: eveningSun(date, latitudeDeg, longitudeDeg, utcOffsetHours).sunsetMs });
  }
  for (let i = 0; i < n; i++) {
    const t = t0 + i * 1_800_000;
    startMs[i] = t;
    const hourOfDay = ((t - t0) / 3_600_000) % 24;
    values[i] = 40 + 10 * Math.cos((2 * Math.PI * (hourOfDay - 15)) / 24) + (opts.noiseSd ?? 1) * gauss();
  }
  for (const ev of opts.events ?? []) {
    const e = evenings.find((x) => x.date === ev.date);
    if (!e?.sunsetMs) throw new Error(`no evening ${ev.date}`);
    const from = e.sunsetMs + (ev.fromH ?? 0.5) * 3_600_000;
    const to = e.sunsetMs + (ev.toH ?? 2.5) * 3_600_000;
    for (let i = 0; i < n; i++) {
      const mid = (startMs[i] as number) + 900_000;
      if (mid >= from && mid < to) values[i] = (values[i] as number) + ev.amplitude;
    }
  }
  return { startMs, values, evenings };
}

/**
 * Nighttime flux against u* with a known threshold: u* log-normal (median 0.2 m s-1, sigma of
 * ln u* 0.6: skewed towards weak turbulence, as nighttime u* usually is; common practice), air
 * temperature following a seasonal and daily cycle, respiration doubling per 10 K and
 * under-read in proportion to u* below `thresholdMs`, plus N(0, 0.2) noise.
 */
export function fluxWithThreshold(opts: {
  days: number;
  seed: number;
  thresholdMs: number;
  startDate?: string;
}) {
  const n = opts.days * 48;
  const t0 = localMidnightUtcMs(opts.startDate ?? "2021-01-01", TEST_SITE.utcOffsetHours);
  const gauss = normal(seeded(opts.seed + 1));
  const startMs = new Float64Array(n);
  const ustar = new Float64Array(n);
  const flux = new Float64Array(n);
  const ta = new Float64Array(n);
  const night = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const t = t0 + i * 1_800_000;
    startMs[i] = t;
    const hour = ((t - t0) / 3_600_000) % 24;
    const doy = (t - t0) / 86_400_000;
    night[i] = hour < 5 || hour >= 20 ? 1 : 0;
    ta[i] =
      8 -
      9 * Math.cos((2 * Math.PI * (doy - 15)) / 365) +
      3 * Math.cos((2 * Math.PI * (hour - 15)) / 24) +
      gauss();
    ustar[i] = 0.2 * Math.exp(0.6 * gauss());
    const respiration = 3 * Math.pow(2, ((ta[i] as number) - 10) / 10);
    flux[i] = respiration * Math.min(1, (ustar[i] as number) / opts.thresholdMs) + 0.2 * gauss();
  }
  return { startMs, ustar, flux, ta, night };
}
