/*
 * The outer stage of the benchmarks that measure the app against a database of their own.
 * lib/env reads the environment once, when it is first imported, so the database and the data
 * directory must be chosen before any app module loads: this stage creates a throwaway migrated
 * database on the private server and a temporary folder, starts the bench file again with them
 * set (and BENCH_STAGE_DIR naming the folder), and removes both when it exits.
 */
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/database";

/** The folder of the inner stage, or undefined in the outer one. */
export const stageDir: string | undefined = process.env.BENCH_STAGE_DIR;

/** Runs `file` (a bench child) again as the inner stage; throws when it fails. `tag` names the temp folder. */
export async function runInnerStage(file: string, tag: string): Promise<void> {
  const { startDatabase } = await import("@/scripts/db");
  const { env } = await import("@/lib/env");
  await startDatabase();
  const base = new URL(env.DATABASE_URL);
  const name = `${decodeURIComponent(base.pathname.slice(1)) || "gloaming"}_test_bench_${randomBytes(3).toString("hex")}`;
  const url = await createMigratedDatabase(env.DATABASE_URL, name);
  const dir = mkdtempSync(join(tmpdir(), `gloaming-${tag}-bench-`));
  try {
    const childEnv = { ...process.env, DATABASE_URL: url, DATA_DIR: join(dir, "data"), BENCH_STAGE_DIR: dir };
    const inner = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", file], { env: childEnv, stdio: "inherit" });
    const code = await new Promise<number | null>((resolve) => inner.on("exit", resolve));
    if (code !== 0) throw new Error(`the measuring stage failed (exit ${code})`);
  } finally {
    await dropDatabase(env.DATABASE_URL, name);
    rmSync(dir, { recursive: true, force: true });
  }
}
