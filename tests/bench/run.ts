/**
 * Benchmark runner (`npm run bench`): imports every tests/bench/*.bench.ts in name order and
 * runs its default export, which prints its own figures. Nothing timed is asserted.
 * `npm run bench -- engine` runs only the benches whose file name contains "engine".
 */
import { readdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

export type Bench = () => Promise<void>;

const here = dirname(fileURLToPath(import.meta.url));
const filter = process.argv.slice(2).filter((a) => a !== "--");
const files = readdirSync(here)
  .filter((f) => f.endsWith(".bench.ts"))
  .filter((f) => filter.length === 0 || filter.some((w) => f.includes(w)))
  .sort();

for (const f of files) {
  console.log(`\n== ${f}`);
  const mod = (await import(pathToFileURL(join(here, f)).href)) as { default?: Bench };
  if (typeof mod.default !== "function") {
    console.log("  (no default export; skipped)");
    continue;
  }
  try {
    await mod.default();
  } catch (e) {
    // One broken bench should not hide the others' figures.
    console.log(`  failed: ${(e as Error).stack ?? String(e)}`);
    process.exitCode = 1;
  }
}
