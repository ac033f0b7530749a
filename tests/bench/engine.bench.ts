/**
 * Evening engine end to end: 20 years of half-hourly synthetic data, 31 columns (~350,000 rows,
 * ~70 MB), streamed from a temp file through readTableFile and classifyTable. Prints rows/s, MB/s,
 * peak RSS, and the floor (read, split lines and fields, Number() each cell) measured in the same
 * run, with the ratio to it. Prints figures only.
 */
import { createReadStream, createWriteStream, mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { once } from "node:events";
import { classifyTable } from "@/lib/classify/evenings";
import type { SiteParams } from "@/lib/classify/site";
import { readTableFile } from "@/lib/series/reader";

const YEARS = 20;
const SITE: SiteParams = {
  latitudeDeg: 46.2,
  longitudeDeg: 8.9,
  elevationM: 450,
  measurementHeightM: 30,
  canopyHeightM: 20,
  utcOffsetHours: 1,
};

/** Deterministic PRNG (mulberry32) so every run reads the same synthetic file. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const pad = (n: number, w = 2): string => String(n).padStart(w, "0");
const stamp = (ms: number): string => {
  const d = new Date(ms);
  return `${d.getUTCFullYear()}${pad(d.getUTCMonth() + 1)}${pad(d.getUTCDate())}${pad(d.getUTCHours())}${pad(d.getUTCMinutes())}`;
};

/**
 * A simple synthetic half-hourly file (marked synthetic): diurnal cycles of radiation, heat
 * fluxes, temperature and turbulence with noise, -9999 gaps; not physically rigorous, only
 * realistic in shape and size for timing.
 */
async function writeSyntheticFile(path: string, years: number): Promise<number> {
  const out = createWriteStream(path, { highWaterMark: 1 << 20 });
  const extra = ["TS_1_1_1", "TS_1_2_1", "SWC_1_1_1", "SWC_1_2_1", "P", "NETRAD", "G_1_1_1", "LW_IN", "LW_OUT", "SW_OUT", "PPFD_IN", "H2O", "CH4", "TAU"];
  const header = ["TIMESTAMP_START", "TIMESTAMP_END", "WS_1_1_1", "WD_1_1_1", "USTAR", "W_SIGMA", "H", "LE", "TA_1_1_1", "PA", "RH", "VPD", "ZL", "MO_LENGTH", "FC", "CO2_1_1_1", "SW_IN", ...extra];
  const rand = rng(20_261_201);
  let buf = `${header.join(",")}\n`;
  const t0 = Date.UTC(2004, 0, 1) - SITE.utcOffsetHours * 3_600_000;
  const n = Math.round(years * 365.25 * 48);
  const local = t0 + SITE.utcOffsetHours * 3_600_000;
  for (let i = 0; i < n; i++) {
    const ms = t0 + i * 1_800_000;
    const hourOfDay = (((ms - t0 + (local - t0)) / 3_600_000) % 24 + 24) % 24;
    const doy = ((i / 48) % 365.25) / 365.25;
    const season = -Math.cos(2 * Math.PI * (doy - 0.03));
    const sun = Math.max(0, Math.sin(((hourOfDay - 6 - season) / (12 + 2 * season)) * Math.PI));
    const sw = 900 * sun * (0.6 + 0.4 * rand());
    const h = sw * 0.3 - 20 + 15 * rand();
    const le = sw * 0.35 + 10 * rand();
    const ta = 10 + 10 * season + 6 * sun + 2 * rand();
    const ws = 1 + 3 * rand() + 2 * sun;
    const ustar = 0.05 + 0.08 * ws + 0.05 * rand();
    const sigw = 1.25 * ustar * (1 + 0.3 * sun);
    const l = -Math.pow(ustar, 3) * 290 / (0.4 * 9.81 * (h / 1200 + (h >= 0 ? 1e-4 : -1e-4)));
    const zl = Math.max(-50, Math.min(50, 16.67 / l));
    const rh = Math.max(10, Math.min(100, 80 - 40 * sun + 10 * rand()));
    const es = 6.112 * Math.exp((17.62 * ta) / (243.12 + ta));
    const vpd = es * (1 - rh / 100);
    const cells: (number | string)[] = [
      ws.toFixed(2), (360 * rand()).toFixed(1), ustar.toFixed(3), sigw.toFixed(3), h.toFixed(1), le.toFixed(1), ta.toFixed(2),
      (96.5 + rand()).toFixed(2), rh.toFixed(1), vpd.toFixed(2), zl.toFixed(3), l.toFixed(1), (-15 * sun + 3 * rand()).toFixed(2),
      (400 + 20 * rand()).toFixed(1), sw.toFixed(1),
    ];
    for (let e = 0; e < extra.length; e++) cells.push((100 * rand()).toFixed(2));
    if (rand() < 0.02) cells[Math.floor(rand() * cells.length)] = -9999;
    buf += `${stamp(ms)},${stamp(ms + 1_800_000)},${cells.join(",")}\n`;
    if (buf.length > 1 << 20) {
      if (!out.write(buf)) await once(out, "drain");
      buf = "";
    }
  }
  out.end(buf);
  await once(out, "finish");
  return n;
}

/** The floor: stream the file, split lines and fields, Number() every cell into Float64Arrays. */
async function floor(path: string, columns: number, rows: number): Promise<number> {
  const cols = Array.from({ length: columns }, () => new Float64Array(rows + 1));
  let partial = "";
  let r = -1; // header
  let sum = 0;
  for await (const chunk of createReadStream(path, { encoding: "utf8", highWaterMark: 1 << 18 })) {
    const lines = (partial + (chunk as string)).split("\n");
    partial = lines.pop() ?? "";
    for (const ln of lines) {
      if (r >= 0) {
        const f = ln.split(",");
        for (let c = 0; c < columns; c++) (cols[c] as Float64Array)[r] = Number(f[c]);
      }
      r++;
    }
  }
  for (const c of cols) sum += c[0] ?? 0;
  return sum + r;
}

function mb(bytes: number): string {
  return (bytes / 1e6).toFixed(1);
}

export default async function engineBench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), "gloaming-bench-"));
  const file = join(dir, "synthetic-20y.csv");
  try {
    const g0 = performance.now();
    const rows = await writeSyntheticFile(file, YEARS);
    const size = statSync(file).size;
    console.log(`  synthetic file: ${rows} rows x 31 columns, ${mb(size)} MB, written in ${((performance.now() - g0) / 1000).toFixed(1)} s`);

    const rssBefore = process.resourceUsage().maxRSS * 1024;
    let sampled = 0;
    const timer = setInterval(() => {
      sampled = Math.max(sampled, process.memoryUsage.rss());
    }, 20);
    const times: number[] = [];
    let evenings = 0;
    let readMs = 0;
    for (let run = 0; run < 2; run++) {
      const t0 = performance.now();
      const { table, report } = await readTableFile(file, { utcOffsetHours: SITE.utcOffsetHours });
      const t1 = performance.now();
      const results = classifyTable(table, SITE);
      const t2 = performance.now();
      evenings = results.length;
      times.push(t2 - t0);
      readMs = t1 - t0;
      if (run === 0) {
        const labels: Record<string, number> = {};
        for (const e of results) labels[e.label] = (labels[e.label] ?? 0) + 1;
        console.log(`  read ${report.rows} rows, ${report.recognised.length} columns recognised, ${report.rejected.length + report.rejectedNotListed} cells rejected; ${evenings} evenings: ${JSON.stringify(labels)}`);
      }
      console.log(`  run ${run + 1}: read ${(readMs / 1000).toFixed(2)} s + classify ${((t2 - t1) / 1000).toFixed(2)} s = ${((t2 - t0) / 1000).toFixed(2)} s`);
    }
    clearInterval(timer);
    const peak = Math.max(process.resourceUsage().maxRSS * 1024, sampled);
    const best = Math.min(...times);

    const f: number[] = [];
    for (let run = 0; run < 2; run++) {
      const t0 = performance.now();
      await floor(file, 31, rows);
      f.push(performance.now() - t0);
    }
    const floorBest = Math.min(...f);

    console.log(`  end to end (best of 2): ${(rows / (best / 1000)).toFixed(0)} rows/s, ${(size / 1e6 / (best / 1000)).toFixed(1)} MB/s, ${(best / 1000).toFixed(2)} s  [target >= 150000 rows/s]`);
    console.log(`  peak RSS: ${mb(peak)} MB (before the runs ${mb(rssBefore)} MB)  [target < 400 MB]`);
    console.log(`  floor (split + Number(), best of 2): ${(rows / (floorBest / 1000)).toFixed(0)} rows/s, ${(size / 1e6 / (floorBest / 1000)).toFixed(1)} MB/s, ${(floorBest / 1000).toFixed(2)} s`);
    console.log(`  ratio end to end / floor: ${(best / floorBest).toFixed(2)}x the floor's time`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
