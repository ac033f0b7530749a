/**
 * Evening engine end to end: 20 years of half-hourly SYNTHETIC data (lib/synthetic), 30 columns (~350,000 rows,
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
import { syntheticCsvChunks } from "@/lib/synthetic/csv";

const YEARS = 20;
const SITE: SiteParams = {
  latitudeDeg: 46.2,
  longitudeDeg: 8.9,
  elevationM: 450,
  measurementHeightM: 30,
  canopyHeightM: 20,
  utcOffsetHours: 1,
};

const TRACERS = Array.from({ length: 14 }, (_, i) => `TRACER_${i + 1}`);

/** Streams the SYNTHETIC generator's CSV (lib/synthetic) to a file: 2 stamps + 14 variables + 14 tracers. */
async function writeSyntheticFile(path: string, years: number): Promise<number> {
  const out = createWriteStream(path, { highWaterMark: 1 << 20 });
  const days = Math.round(years * 365.25);
  let pending = "";
  for (const chunk of syntheticCsvChunks({ site: SITE, startDate: "2004-01-01", days, seed: 2026, tracers: TRACERS, gapFraction: 0.02 })) {
    pending += chunk;
    if (pending.length > 1 << 20) {
      if (!out.write(pending)) await once(out, "drain");
      pending = "";
    }
  }
  out.end(pending);
  await once(out, "finish");
  return days * 48;
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
    console.log(`  synthetic file: ${rows} rows x 30 columns, ${mb(size)} MB, written in ${((performance.now() - g0) / 1000).toFixed(1)} s`);

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
      const { table, report } = await readTableFile(file, { utcOffsetHours: SITE.utcOffsetHours, mapping: Object.fromEntries(TRACERS.map((t) => [t, t])) });
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
      await floor(file, 30, rows);
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
