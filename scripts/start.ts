/*
 * `npm start` (and `npm run dev` with the argument "dev"): database server, pending
 * migrations, the demo scenario when the database has no accounts yet, a production build
 * when there is none or the sources changed since, then Next on APP_URL's port and the job
 * worker (scripts/worker.ts) beside it.
 */
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { seedDemoScenario } from "../db/seeds/01_demo_scenario";
import { seedDemoData } from "../db/seeds/02_demo_data";
import knexConfig from "../knexfile";
import { closeDb, db } from "../lib/db/knex";
import { env } from "../lib/env";
import { startDatabase } from "./db";
import { startCatcherFromEnv } from "./mail-catcher";
import { WEB_NODE_FLAGS } from "./web-flags";
import { superviseWorker } from "./worker-process";

const root = process.cwd();
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
const log = (msg: string) => console.log(`[start] ${msg}`);

const SOURCES = ["app", "features", "lib", "fonts", "public"];
const CONFIGS = ["next.config.ts", "tailwind.config.ts", "postcss.config.mjs", "tsconfig.json", "package-lock.json"];

function newestMtime(p: string): number {
  if (!existsSync(p)) return 0;
  const st = statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, entry)));
  return newest;
}

function needsBuild(): boolean {
  const buildId = path.join(root, ".next", "BUILD_ID");
  if (!existsSync(buildId)) return true;
  const built = statSync(buildId).mtimeMs;
  return [...SOURCES, ...CONFIGS].some((p) => newestMtime(path.join(root, p)) > built);
}

async function prepareDatabase(): Promise<void> {
  await startDatabase();
  const [, pending] = (await db.migrate.list(knexConfig.migrations)) as [unknown[], unknown[]];
  if (pending.length > 0) {
    const [, applied] = (await db.migrate.latest(knexConfig.migrations)) as [number, string[]];
    log(`applied ${applied.length} migration(s)`);
  }
  if (env.DEMO_MODE) {
    const row = (await db("users").count({ n: "*" }).first()) as { n: number | string };
    if (Number(row.n) === 0) {
      await seedDemoScenario(db);
      log("seeded the demo scenario (invented group, site and accounts; password gloaming-demo)");
      log("importing the demo scenario's synthetic two-year file through the import pipeline...");
      await seedDemoData(db);
      log("demo data imported and classified");
    }
  }
  await closeDb();
}

async function main(): Promise<void> {
  const dev = process.argv[2] === "dev";
  await prepareDatabase();
  // Lives as long as this process; without SMTP_HOST every message lands here.
  await startCatcherFromEnv();
  const port = new URL(env.APP_URL).port || "3000";
  const childEnv = { ...process.env, DEMO_MODE: String(env.DEMO_MODE), NEXT_TELEMETRY_DISABLED: "1" };

  if (!dev && needsBuild()) {
    log("building the app (next build)...");
    const r = spawnSync(process.execPath, [nextBin, "build"], { stdio: "inherit", env: childEnv });
    if (r.status !== 0) process.exit(r.status ?? 1);
  }
  log(`serving ${env.APP_URL}`);
  const args = dev ? [nextBin, "dev", "-p", port] : [...WEB_NODE_FLAGS, nextBin, "start", "-p", port];
  const child = spawn(process.execPath, args, { stdio: "inherit", env: childEnv });
  // The job worker runs beside Next; both stop together.
  const worker = superviseWorker({ dev, env: childEnv, log });
  for (const sig of ["SIGINT", "SIGTERM"] as const)
    process.on(sig, () => {
      child.kill(sig);
      void worker.stop(sig);
    });
  child.on("exit", (code) => {
    void worker.stop().then(() => process.exit(code ?? 0));
  });
}

main().catch((err: unknown) => {
  console.error(`[start] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
