/*
 * `npm test`: private database server, chromium, then lint, typecheck and vitest, stopping
 * at the first failure. Arguments (`npm test -- tests/lib`) go to vitest and skip lint and
 * typecheck.
 */
import { spawnSync } from "node:child_process";
import path from "node:path";
import { ensureChromium } from "./chromium";
import { startDatabase } from "./db";

const bin = (name: string) => path.join(process.cwd(), "node_modules", ".bin", name);

function step(label: string, cmd: string, args: string[]): void {
  console.log(`\n[test] ${label}: ${[path.basename(cmd), ...args].join(" ")}`);
  const r = spawnSync(cmd, args, { stdio: "inherit" });
  if (r.status !== 0) {
    console.error(`\n[test] ${label} failed.`);
    process.exit(r.status ?? 1);
  }
}

async function main(): Promise<void> {
  const vitestArgs = process.argv.slice(2);
  await startDatabase();
  ensureChromium();
  if (vitestArgs.length === 0) {
    step("lint", bin("eslint"), ["."]);
    step("typecheck", bin("tsc"), ["--noEmit", "-p", "."]);
  }
  step("tests", bin("vitest"), ["run", ...vitestArgs]);
}

main().catch((err: unknown) => {
  console.error(`[test] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
