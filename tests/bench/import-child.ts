/*
 * The import benchmark's work (see import.bench.ts). Creates gloaming_test_bench_<tag> on the
 * private server, migrates it, imports a 20-year SYNTHETIC file through the real pipeline, loads
 * the same file with LOAD DATA LOCAL INFILE into a copy of half_hours, prints, drops the database.
 */
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { createReadStream, createWriteStream, mkdtempSync, rmSync, statSync } from "node:fs";
import { once } from "node:events";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { createConnection } from "mysql2/promise";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/database";

const ROWS = 350_000;
const DAYS = Math.ceil(ROWS / 48);
/** Columns besides the two timestamps and the 14 of the generator: 8 tracers and 6 the import does not read. */
const TRACERS = ["O3", "NO2", "ISOPRENE", "CH4", "N2O", "SO2", "NH3", "VOC1"];
const EXTRA = ["TS_1_1_1", "SWC_1_1_1", "P_RAIN", "NETRAD", "G_1_1_1", "LW_IN"];

const mb = (b: number) => (b / 1e6).toFixed(1);

// lib/env reads the environment once, when it is first imported: the throwaway database and data
// directory are chosen by this outer stage, which starts the file again with them set before any
// app module loads, and removes both afterwards however the measuring stage ends.
async function outer(): Promise<void> {
  const { startDatabase } = await import("@/scripts/db");
  const { env } = await import("@/lib/env");
  await startDatabase();
  const base = new URL(env.DATABASE_URL);
  const name = `${decodeURIComponent(base.pathname.slice(1)) || "gloaming"}_test_bench_${randomBytes(3).toString("hex")}`;
  const url = await createMigratedDatabase(env.DATABASE_URL, name);
  const dir = mkdtempSync(join(tmpdir(), "gloaming-import-bench-"));
  try {
    const childEnv = {
      ...process.env,
      DATABASE_URL: url,
      DATA_DIR: join(dir, "data"),
      IMPORT_BENCH_DIR: dir,
    };
    const inner = spawn(
      process.execPath,
      ["--conditions=react-server", "--import", "tsx", fileURLToPath(import.meta.url)],
      { env: childEnv, stdio: "inherit" },
    );
    const code = await new Promise<number | null>((resolve) => inner.on("exit", resolve));
    if (code !== 0) throw new Error(`the measuring stage failed (exit ${code})`);
  } finally {
    await dropDatabase(env.DATABASE_URL, name);
    rmSync(dir, { recursive: true, force: true });
  }
}

async function inner(dir: string): Promise<void> {
  const url = process.env.DATABASE_URL ?? "";
  const { connectionOptions } = await import("@/lib/db/connection");
  const { syntheticCsvChunks } = await import("@/lib/synthetic/csv");
  const site = {
    latitudeDeg: 46.2,
    longitudeDeg: 8.9,
    elevationM: 450,
    measurementHeightM: 30,
    canopyHeightM: 20,
    utcOffsetHours: 1,
  };

  // ---- the file
  const file = join(dir, "synthetic-20y.csv");
  const g0 = performance.now();
  const out = createWriteStream(file, { highWaterMark: 1 << 20 });
  let lines = 0;
  for (const chunk of syntheticCsvChunks({
    site,
    startDate: "2004-01-01",
    days: DAYS,
    seed: 4242,
    tracers: TRACERS,
    gapFraction: 0.01,
  })) {
    // Six more columns the import leaves out (a real file has more than it needs); the
    // generator yields the header as its own first chunk.
    const text =
      lines === 0
        ? chunk.replace("\n", `,${EXTRA.join(",")}\n`)
        : chunk.replace(/\n/g, ",1.5,0.31,0,120.5,-8.2,330.1\n");
    lines += (text.match(/\n/g) ?? []).length;
    if (!out.write(text)) await once(out, "drain");
  }
  out.end();
  await once(out, "finish");
  const size = statSync(file).size;
  const header = (await readFirstLine(file)).split(",");
  console.log(
    `  synthetic file: ${lines - 1} rows x ${header.length} columns, ${mb(size)} MB, written in ${((performance.now() - g0) / 1000).toFixed(1)} s`,
  );

  const { db, closeDb } = await import("@/lib/db/knex");
  const { putObject } = await import("@/lib/storage/storage");
  const { startImport } = await import("@/features/imports/server/mutations");
  const { runImport } = await import("@/features/imports/server/pipeline");
  const { siteForCaller } = await import("@/features/imports/server/access");
  const [groupId] = await db("research_groups").insert({ name: "Bench group (synthetic)" });
  const [siteId] = await db("sites").insert({
    group_id: Number(groupId),
    name: "Bench site (synthetic)",
    latitude: site.latitudeDeg,
    longitude: site.longitudeDeg,
    elevation_m: site.elevationM,
    measurement_height_m: site.measurementHeightM,
    canopy_height_m: site.canopyHeightM,
    utc_offset_hours: site.utcOffsetHours,
  });
  await db("users").insert({
    id: "benchuser00000000",
    email: "bench@example.test",
    display_name: "Bench",
    password_hash: "x",
  });
  await db("memberships").insert({
    user_id: "benchuser00000000",
    group_id: Number(groupId),
    role: "analyst",
  });
  const { site: siteRow } = await siteForCaller({ userId: "benchuser00000000" }, Number(siteId), "analyst");

  // ---- end to end through the pipeline
  let peak = 0;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage.rss())), 20);
  const rssBefore = process.memoryUsage.rss();
  const t0 = performance.now();
  const stored = await putObject(createReadStream(file, { highWaterMark: 1 << 18 }));
  const t1 = performance.now();
  const started = await startImport({
    site: siteRow,
    userId: "benchuser00000000",
    stored,
    filename: "synthetic-20y.csv",
    settings: { columns: Object.fromEntries(TRACERS.map((t) => [t, { variable: t, unit: "nmol/mol" }])) },
  });
  if (started.kind !== "queued") throw new Error("bench import not queued");
  const phases: Record<string, number> = {};
  let phase = "";
  let phaseStart = performance.now();
  const outcome = await runImport(started.importId, (p) => {
    if (p !== phase) {
      const now = performance.now();
      if (phase) phases[phase] = (phases[phase] ?? 0) + (now - phaseStart);
      phase = p;
      phaseStart = now;
    }
  });
  const t2 = performance.now();
  if (phase) phases[phase] = (phases[phase] ?? 0) + (t2 - phaseStart);
  clearInterval(timer);
  peak = Math.max(peak, process.memoryUsage.rss(), process.resourceUsage().maxRSS * 1024);
  const rows = outcome.outcome === "landed" ? outcome.rows : 0;
  const total = (t2 - t0) / 1000;
  console.log(`  outcome: ${JSON.stringify(outcome)}`);
  console.log(
    `  store original (sha256 + copy): ${((t1 - t0) / 1000).toFixed(2)} s; ${Object.entries(phases)
      .map(([k, v]) => `${k} ${(v / 1000).toFixed(2)} s`)
      .join(", ")}`,
  );
  console.log(
    `  load average (1, 5, 15 min) at the end of the import: ${loadavg()
      .map((l) => l.toFixed(2))
      .join(", ")} on 2 cores`,
  );
  console.log(`  end to end: ${total.toFixed(2)} s, ${(rows / total).toFixed(0)} rows/s  [target < 20 s]`);
  console.log(`  peak RSS: ${mb(peak)} MB (before ${mb(rssBefore)} MB)  [target < 400 MB]`);
  const writeS = (phases.writing ?? 0) / 1000;

  // ---- where classifying goes: reading the rows back, the classifier itself
  {
    const { loadHalfHours } = await import("@/lib/evenings/load");
    const { classifyTable } = await import("@/lib/classify/evenings");
    const { DEFAULT_RULE_SET } = await import("@/lib/classify/rules");
    const c0 = performance.now();
    const back = await loadHalfHours(Number(siteId), Date.UTC(2003, 11, 30), Date.UTC(2030, 0, 1));
    const c1 = performance.now();
    const evenings = classifyTable(back, site, DEFAULT_RULE_SET).length;
    const c2 = performance.now();
    const readS = (c1 - c0) / 1000;
    console.log(
      `  bare loadHalfHours of the site after the import: ${back.startMs.length} rows x ${Object.keys(back.columns).length} columns in ${readS.toFixed(2)} s, ${(back.startMs.length / readS).toFixed(0)} rows/s`,
    );
    console.log(
      `  classifying, apart: read back ${back.startMs.length} rows in ${readS.toFixed(2)} s, classify ${evenings} evenings in ${((c2 - c1) / 1000).toFixed(2)} s`,
    );
  }

  // ---- the floor: the same file by LOAD DATA LOCAL INFILE into a copy of the table
  const conn = await createConnection({ ...connectionOptions(url), flags: ["+LOCAL_FILES"] });
  await conn.query("CREATE TABLE half_hours_floor LIKE half_hours");
  const idx = (n: string) => header.indexOf(n);
  const vars = header.map((h, i) => `@c${i}`);
  const col = (n: string) => `NULLIF(@c${idx(n)}, '-9999')`;
  const measures = [
    "WS",
    "WD",
    "USTAR",
    "W_SIGMA",
    "H",
    "LE",
    "TA",
    "PA",
    "RH",
    "VPD",
    "ZL",
    "FC",
    "CO2",
    "SW_IN",
  ];
  const set = [
    `site_id = ${Number(siteId)}`,
    `start_utc = STR_TO_DATE(@c${idx("TIMESTAMP_START")}, '%Y%m%d%H%i') - INTERVAL 1 HOUR`,
    ...measures.map((m) => `${m.toLowerCase()} = ${col(m)}`),
    ...TRACERS.map((t, i) => `tracer_${i + 1} = ${col(t)}`),
  ];
  const l0 = performance.now();
  const [res] = await conn.query({
    sql: `LOAD DATA LOCAL INFILE 'bench.csv' INTO TABLE half_hours_floor FIELDS TERMINATED BY ',' LINES TERMINATED BY '\\n' IGNORE 1 LINES (${vars.join(",")}) SET ${set.join(", ")}`,
    infileStreamFactory: () => createReadStream(file),
  });
  const loadS = (performance.now() - l0) / 1000;
  const loaded = (res as { affectedRows: number }).affectedRows;
  await conn.end();
  console.log(
    `  floor, LOAD DATA LOCAL INFILE: ${loaded} rows in ${loadS.toFixed(2)} s, ${(loaded / loadS).toFixed(0)} rows/s`,
  );
  console.log(
    `  ratio: end to end ${(total / loadS).toFixed(2)}x the LOAD DATA time; the write phase alone ${(writeS / loadS).toFixed(2)}x`,
  );
  await closeDb();
}

async function readFirstLine(path: string): Promise<string> {
  for await (const chunk of createReadStream(path, { end: 65_535, encoding: "utf8" })) {
    return String(chunk).split("\n")[0] ?? "";
  }
  return "";
}

const benchDir = process.env.IMPORT_BENCH_DIR;
(benchDir ? inner(benchDir) : outer()).catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
