/**
 * Load on loopback (`npm run bench -- load`): the calendar (one site-year), evening (a year of
 * evenings, cycled) and seasons (one site, every year) endpoints, each with 50 concurrent
 * clients signed in as the demo's lead, analyst and viewer (one session per connection) for
 * 30 s, with autocannon against `next start` and a throwaway database holding the SYNTHETIC
 * demo data. Prints p50/p95/p99, requests/s, errors and non-2xx answers, the server's CPU time
 * per request and the load average. Shares its child with review.bench.ts (BENCH_PLAN=load).
 */
import { spawn } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

export default async function loadBench(): Promise<void> {
  const here = dirname(fileURLToPath(import.meta.url));
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", join(here, "review-child.ts")], {
    stdio: "inherit",
    env: { ...process.env, BENCH_PLAN: "load" },
  });
  const code = await new Promise<number | null>((resolve) => child.on("exit", resolve));
  if (code !== 0) console.log(`  load bench failed (exit ${code})`);
}
