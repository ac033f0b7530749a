/**
 * Review endpoints under load (`npm run bench -- review`): GET /api/sites/:id/evenings for one
 * site-year and GET /api/evenings/:id (cycling through a year of evenings), each at 20
 * concurrent clients for a bounded time with autocannon, against `next start` on loopback and a
 * throwaway database holding the SYNTHETIC demo data set. Prints p50/p95/p99, req/s and errors.
 *
 * The work runs in a child process started with the react-server condition, because the server
 * modules it seeds through begin with `import "server-only"`. It needs a production build (`next
 * build`); when .next has none it builds one first.
 */
import { spawn } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

export default async function reviewBench(): Promise<void> {
  const here = dirname(fileURLToPath(import.meta.url));
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", join(here, "review-child.ts")], {
    stdio: "inherit",
    env: { ...process.env, BENCH_PLAN: "review" },
  });
  const code = await new Promise<number | null>((resolve) => child.on("exit", resolve));
  if (code !== 0) console.log(`  review bench failed (exit ${code})`);
}
