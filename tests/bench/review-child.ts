/*
 * The review benchmark's work (see review.bench.ts): a throwaway database with the synthetic
 * demo data, `next start` against it, autocannon at 20 connections per endpoint, figures printed,
 * everything removed afterwards.
 */
import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { fileURLToPath } from "node:url";
import { join } from "node:path";
import { createRequire } from "node:module";
import { createConnection } from "mysql2/promise";

// autocannon ships no types; the part used here, typed locally.
type Result = {
  requests: { total: number; average: number };
  throughput: { average: number };
  non2xx: number;
  errors: number;
  timeouts: number;
};
type Instance = PromiseLike<Result> & {
  on(event: "response", fn: (client: unknown, status: number, bytes: number, ms: number) => void): void;
};
type Options = {
  url: string;
  connections: number;
  duration: number;
  headers: Record<string, string>;
  requests: Array<{ setupRequest: (req: Record<string, unknown>) => Record<string, unknown> }>;
};
const autocannon = createRequire(import.meta.url)("autocannon") as (opts: Options) => Instance;

const CONNECTIONS = 20;
const SECONDS = 8;
const NEXT_BIN = join(process.cwd(), "node_modules", "next", "dist", "bin", "next");

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

async function load(title: string, url: string, headers: Record<string, string>, paths: string[]): Promise<void> {
  const times: number[] = [];
  let i = 0;
  const instance = autocannon({
    url,
    connections: CONNECTIONS,
    duration: SECONDS,
    headers,
    requests: [{ setupRequest: (req) => ({ ...req, path: paths[i++ % paths.length]! }) }],
  });
  instance.on("response", (_client, _status, _bytes, ms) => times.push(ms));
  const r = await instance;
  times.sort((a, b) => a - b);
  const bad = r.non2xx + r.errors + r.timeouts;
  console.log(
    `  ${title}: ${r.requests.total} requests in ${SECONDS} s at ${CONNECTIONS} connections, ${r.requests.average.toFixed(0)} req/s, ` +
      `p50 ${percentile(times, 50).toFixed(1)} ms, p95 ${percentile(times, 95).toFixed(1)} ms, p99 ${percentile(times, 99).toFixed(1)} ms, ` +
      `${(r.throughput.average / 1e6).toFixed(1)} MB/s, errors/non-2xx ${bad}`,
  );
}

// lib/env reads the environment once, at import: the database and data directory are chosen by
// an outer stage that starts this file again with them set, before any app module loads.
async function outer(): Promise<void> {
  const { startDatabase } = await import("@/scripts/db");
  const { env } = await import("@/lib/env");
  const { connectionOptions } = await import("@/lib/db/connection");
  await startDatabase();
  const base = new URL(env.DATABASE_URL);
  const name = `${decodeURIComponent(base.pathname.slice(1)) || "gloaming"}_test_bench_${randomBytes(3).toString("hex")}`;
  const admin = await createConnection({ ...connectionOptions(env.DATABASE_URL), database: undefined });
  await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  const url = new URL(env.DATABASE_URL);
  url.pathname = `/${name}`;
  const dir = mkdtempSync(join(tmpdir(), "gloaming-review-bench-"));
  try {
    const childEnv = { ...process.env, DATABASE_URL: url.toString(), DATA_DIR: join(dir, "data"), REVIEW_BENCH_INNER: "1" };
    const migrate = spawnSync(process.execPath, ["--conditions=react-server", "--import", "tsx", "node_modules/knex/bin/cli.js", "migrate:latest", "--knexfile", "knexfile.ts"], {
      env: childEnv,
      encoding: "utf8",
    });
    if (migrate.status !== 0) throw new Error(`migrate failed: ${migrate.stderr}`);
    const inner = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", fileURLToPath(import.meta.url)], { env: childEnv, stdio: "inherit" });
    const code = await new Promise<number | null>((resolve) => inner.on("exit", resolve));
    if (code !== 0) throw new Error(`the measuring stage failed (exit ${code})`);
  } finally {
    await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
    await admin.end();
    rmSync(dir, { recursive: true, force: true });
  }
}

async function inner(): Promise<void> {
  const url = process.env.DATABASE_URL!;
  let server: ReturnType<typeof spawn> | null = null;
  try {
    const { db, closeDb } = await import("@/lib/db/knex");
    const { seedDemoData } = await import("@/db/seeds/02_demo_data");
    const { lucia } = await import("@/lib/auth/lucia");
    const { DEMO_ACCOUNTS, DEMO_SITE } = await import("@/lib/demo/scenario");
    const s0 = performance.now();
    await seedDemoData(db);
    const site = await db("sites").where({ name: DEMO_SITE.name }).first<{ id: number }>("id");
    const analyst = await db("users").where({ email: DEMO_ACCOUNTS.find((a) => a.role === "analyst")!.email }).first<{ id: string }>("id");
    if (!site || !analyst) throw new Error("demo scenario missing");
    const ids = (await db("evenings").where("site_id", site.id).whereBetween("local_date", ["2024-01-01", "2024-12-31"]).pluck("id")) as number[];
    console.log(`  synthetic demo data: ${ids.length} evenings in 2024, seeded in ${((performance.now() - s0) / 1000).toFixed(1)} s`);
    const session = await lucia.createSession(analyst.id, {});
    const cookie = lucia.createSessionCookie(session.id);
    await closeDb();

    if (!existsSync(join(process.cwd(), ".next", "BUILD_ID"))) {
      console.log("  no production build in .next: running next build (minutes on 2 cores)");
      const b = spawnSync(process.execPath, [NEXT_BIN, "build"], { env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" }, stdio: "inherit" });
      if (b.status !== 0) throw new Error("next build failed");
    }
    const port = 3900 + Math.floor(Math.random() * 90);
    const origin = `http://127.0.0.1:${port}`;
    server = spawn(process.execPath, [NEXT_BIN, "start", "-p", String(port), "-H", "127.0.0.1"], {
      env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1", DATABASE_URL: url, APP_URL: origin },
      stdio: "ignore",
      detached: true,
    });
    const headers = { cookie: `${cookie.name}=${cookie.value}`, accept: "application/json" };
    const deadline = Date.now() + 60_000;
    for (;;) {
      try {
        const res = await fetch(`${origin}/api/evenings/${ids[0]}`, { headers });
        if (res.ok) break;
        throw new Error(`status ${res.status}`);
      } catch (err) {
        if (Date.now() > deadline) throw new Error(`next start did not answer: ${String(err)}`);
        await new Promise((r) => setTimeout(r, 300));
      }
    }
    const year = await (await fetch(`${origin}/api/sites/${site.id}/evenings?from=2024-01-01&to=2024-12-31`, { headers })).text();
    console.log(`  one site-year answer: ${(year.length / 1024).toFixed(0)} kB`);
    // A few warm-up requests so the first compiled paths are not timed.
    for (let w = 0; w < 20; w++) await fetch(`${origin}/api/evenings/${ids[w % ids.length]}`, { headers });
    await load("GET /api/sites/:id/evenings (site-year)", origin, headers, [`/api/sites/${site.id}/evenings?from=2024-01-01&to=2024-12-31`]);
    await load("GET /api/evenings/:id (year of evenings, cycled)", origin, headers, ids.map((id) => `/api/evenings/${id}`));
  } finally {
    if (server?.pid) {
      try {
        process.kill(-server.pid, "SIGTERM");
      } catch {
        /* already gone */
      }
    }
  }
}

await (process.env.REVIEW_BENCH_INNER ? inner() : outer());
