/*
 * The work of the review and load benchmarks (review.bench.ts, load.bench.ts): a throwaway
 * database with the synthetic demo data, `next start` against it, autocannon per endpoint,
 * figures printed, everything removed afterwards. `BENCH_PLAN` chooses the plan: "review" (20
 * connections, 8 s, one session) or "load" (50 connections, 30 s, each connection its own
 * signed-in person). Besides latency it prints the CPU time the server process spent per
 * request, which other work on the machine does not inflate the way it does latency, and the
 * load average at the end of each run. The review plan measures each endpoint twice: as a
 * browser asks (Accept-Encoding: gzip and others; Next then compresses the evening answer, while
 * the calendar's goes out plain, see DEVELOPERS.md "Fast reads") and without Accept-Encoding, as
 * a plain script asks. Both plans first measure a floor: a route handler that does no work.
 */
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readFileSync, readdirSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { join } from "node:path";
import { createRequire } from "node:module";
import { get as httpGet } from "node:http";
import { runInnerStage, stageDir } from "@/tests/bench/stage";
import { WEB_NODE_FLAGS } from "@/scripts/web-flags";

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
type Request = Record<string, unknown> & { headers?: Record<string, string> };
type Options = {
  url: string;
  connections: number;
  duration: number;
  headers: Record<string, string>;
  requests: Array<{ setupRequest: (req: Request, context: Record<string, unknown>) => Request }>;
};
const autocannon = createRequire(import.meta.url)("autocannon") as (opts: Options) => Instance;

type Plan = { connections: number; seconds: number; perConnectionSession: boolean };
const PLANS: Record<string, Plan> = {
  review: { connections: 20, seconds: 8, perConnectionSession: false },
  load: { connections: 50, seconds: 30, perConnectionSession: true },
};
const PLAN_NAME = process.env.BENCH_PLAN ?? "review";
const PLAN = PLANS[PLAN_NAME] ?? PLANS.review!;
const NEXT_BIN = join(process.cwd(), "node_modules", "next", "dist", "bin", "next");

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

// CPU time (user + system) of every process in a process group, ms, from /proc (Linux).
function groupCpuMs(pgid: number): number {
  let ticks = 0;
  for (const p of readdirSync("/proc")) {
    if (!/^\d+$/.test(p)) continue;
    try {
      const stat = readFileSync(`/proc/${p}/stat`, "utf8");
      const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      if (Number(f[2]) === pgid) ticks += Number(f[11]) + Number(f[12]);
    } catch {
      /* the process ended meanwhile */
    }
  }
  return ticks * 10; // USER_HZ is 100 on Linux
}

// The bytes on the wire (fetch would decompress them) and their Content-Encoding.
function rawBytes(url: string, headers: Record<string, string>): Promise<{ bytes: number; encoding: string }> {
  return new Promise((resolve, reject) => {
    httpGet(url, { headers }, (res) => {
      let bytes = 0;
      res.on("data", (c: Buffer) => (bytes += c.length));
      res.on("end", () => resolve({ bytes, encoding: String(res.headers["content-encoding"] ?? "identity") }));
      res.on("error", reject);
    }).on("error", reject);
  });
}

function loadAverage(): string {
  try {
    return readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
  } catch {
    return "n/a";
  }
}

const WARM_UP_SECONDS = 5;
const WARM_UP_ALL_SECONDS = 20;

// autocannon at the plan's connections against `paths` in turn, for `seconds`.
function fire(url: string, cookies: string[], paths: string[], encoding: string | null, seconds: number): Instance {
  let i = 0;
  let handed = 0;
  return autocannon({
    url,
    connections: PLAN.connections,
    duration: seconds,
    headers: { accept: "application/json", cookie: cookies[0]!, ...(encoding ? { "accept-encoding": encoding } : {}) },
    requests: [
      {
        setupRequest: (req, context) => {
          // each connection keeps the cookie it was handed first: one signed-in person per client
          if (PLAN.perConnectionSession && typeof context.cookie !== "string") context.cookie = cookies[handed++ % cookies.length];
          const cookie = typeof context.cookie === "string" ? context.cookie : cookies[0]!;
          return { ...req, path: paths[i++ % paths.length]!, headers: { ...req.headers, cookie } };
        },
      },
    ],
  });
}

// Browsers (and so the app's own pages) send this; scripts often send none.
const BROWSER_ENCODING = "gzip, deflate, br, zstd";

async function load(
  title: string,
  url: string,
  cookies: string[],
  paths: string[],
  serverPgid: number,
  encoding: string | null,
  expectStatus = 200,
): Promise<void> {
  // An untimed run first: the server's code paths for this request are compiled by the JIT and
  // its caches are filled, as on a server that has been running for a while.
  await fire(url, cookies, paths, encoding, WARM_UP_SECONDS);
  const times: number[] = [];
  const cpu0 = groupCpuMs(serverPgid);
  const instance = fire(url, cookies, paths, encoding, PLAN.seconds);
  let wrong = 0;
  instance.on("response", (_client, status, _bytes, ms) => {
    times.push(ms);
    if (status !== expectStatus) wrong++;
  });
  const r = await instance;
  const cpuMs = groupCpuMs(serverPgid) - cpu0;
  times.sort((a, b) => a - b);
  const bad = wrong + r.errors + r.timeouts;
  console.log(
    `  ${title}, ${encoding ? "as a browser asks (Accept-Encoding: gzip...)" : "without Accept-Encoding"}: ${r.requests.total} requests in ${PLAN.seconds} s at ${PLAN.connections} connections, ${r.requests.average.toFixed(0)} req/s, ` +
      `p50 ${percentile(times, 50).toFixed(1)} ms, p95 ${percentile(times, 95).toFixed(1)} ms, p99 ${percentile(times, 99).toFixed(1)} ms, ` +
      `${(r.throughput.average / 1e6).toFixed(1)} MB/s, errors or unexpected statuses ${bad}, ` +
      `server CPU ${r.requests.total > 0 ? (cpuMs / r.requests.total).toFixed(2) : "n/a"} ms/request, load average ${loadAverage()}`,
  );
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
    const people = await db("users")
      .whereIn(
        "email",
        DEMO_ACCOUNTS.map((a) => a.email),
      )
      .pluck<string[]>("id");
    const analyst = await db("users").where({ email: DEMO_ACCOUNTS.find((a) => a.role === "analyst")!.email }).first<{ id: string }>("id");
    if (!site || !analyst || people.length === 0) throw new Error("demo scenario missing");
    const ids = (await db("evenings").where("site_id", site.id).whereBetween("local_date", ["2024-01-01", "2024-12-31"]).pluck<number[]>("id")).map(Number);
    const all = (await db("evenings").where("site_id", site.id).count({ n: "*" }).first()) as { n: number | string };
    console.log(
      `  synthetic demo data: ${ids.length} evenings in 2024 (${Number(all.n)} at the site), seeded in ${((performance.now() - s0) / 1000).toFixed(1)} s`,
    );
    // The review plan signs in once; the load plan signs in one session per connection, spread
    // over the demo's lead, analyst and viewer.
    const cookies: string[] = [];
    const sessions = PLAN.perConnectionSession ? PLAN.connections : 1;
    for (let k = 0; k < sessions; k++) {
      const who = PLAN.perConnectionSession ? people[k % people.length]! : analyst.id;
      const c = lucia.createSessionCookie((await lucia.createSession(who, {})).id);
      cookies.push(`${c.name}=${c.value}`);
    }
    await closeDb();

    if (!existsSync(join(process.cwd(), ".next", "BUILD_ID"))) {
      console.log("  no production build in .next: running next build (minutes on 2 cores)");
      const b = spawnSync(process.execPath, [NEXT_BIN, "build"], { env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" }, stdio: "inherit" });
      if (b.status !== 0) throw new Error("next build failed");
    }
    const port = 3900 + Math.floor(Math.random() * 90);
    const origin = `http://127.0.0.1:${port}`;
    // started as `npm start` starts it (scripts/start.ts): the same Node flags
    server = spawn(process.execPath, [...WEB_NODE_FLAGS, NEXT_BIN, "start", "-p", String(port), "-H", "127.0.0.1"], {
      env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1", DATABASE_URL: url, APP_URL: origin },
      stdio: "ignore",
      detached: true,
    });
    const pgid = server.pid!;
    const headers = { cookie: cookies[0]!, accept: "application/json" };
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
    const yearPath = `/api/sites/${site.id}/evenings?from=2024-01-01&to=2024-12-31`;
    const seasonsPath = `/api/seasons?sites=${site.id}`;
    const year = await (await fetch(`${origin}${yearPath}`, { headers })).text();
    const yearCount = (JSON.parse(year) as { evenings: unknown[] }).evenings.length;
    if (yearCount !== ids.length) throw new Error(`the site-year answer holds ${yearCount} evenings, expected ${ids.length}`);
    const sent = await rawBytes(`${origin}${yearPath}`, { ...headers, "accept-encoding": "gzip, deflate" });
    console.log(`  one site-year answer: ${(year.length / 1024).toFixed(0)} kB, ${(sent.bytes / 1024).toFixed(0)} kB as sent (${sent.encoding})`);
    // Warm-up, untimed: every measured path in turn for a while, so that the JIT has compiled
    // them and the pools are full, as on a server that has been running for some time (the first
    // ~20 s after a start are markedly slower).
    const everyPath = [yearPath, ...ids.map((id) => `/api/evenings/${id}`), ...(PLAN_NAME === "load" ? [seasonsPath] : [])];
    await fire(origin, cookies, everyPath, BROWSER_ENCODING, WARM_UP_ALL_SECONDS);
    await fire(origin, [""], ["/api/sites"], null, WARM_UP_SECONDS);
    console.log(`  plan ${PLAN_NAME}: ${PLAN.connections} connections, ${PLAN.seconds} s per endpoint, ${cookies.length} signed-in session(s); load average before ${loadAverage()}`);
    // The floor: a route handler that answers 401 from the missing cookie alone (no query, 80 bytes).
    await load("floor: GET /api/sites without a session (401)", origin, [""], ["/api/sites"], pgid, BROWSER_ENCODING, 401);
    for (const encoding of PLAN_NAME === "review" ? [BROWSER_ENCODING, null] : [BROWSER_ENCODING]) {
      await load("GET /api/sites/:id/evenings (site-year)", origin, cookies, [yearPath], pgid, encoding);
      await load("GET /api/evenings/:id (year of evenings, cycled)", origin, cookies, ids.map((id) => `/api/evenings/${id}`), pgid, encoding);
    }
    if (PLAN_NAME === "load") {
      const seasons = await (await fetch(`${origin}${seasonsPath}`, { headers })).text();
      console.log(`  one seasons answer (every year of the site): ${(seasons.length / 1024).toFixed(0)} kB`);
      await load("GET /api/seasons (one site, all years)", origin, cookies, [seasonsPath], pgid, BROWSER_ENCODING);
    }
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

// The throwaway database and data folder are chosen by the outer stage (stage.ts).
await (stageDir ? inner() : runInnerStage(fileURLToPath(import.meta.url), "review"));
