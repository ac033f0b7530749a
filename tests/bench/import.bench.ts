/**
 * Import end to end (`npm run bench -- import`): 350,000 half-hourly rows x 30 columns of
 * SYNTHETIC data through storage, the import job (streaming parse, validation, one LOAD DATA LOCAL
 * INFILE streamed from the parsed table inside the import's transaction) and the evening
 * classification, against a throwaway database on the private server; then the same file by a
 * bare LOAD DATA LOCAL INFILE as the floor. Prints figures (and the load average) only.
 *
 * The work runs in a child process started with the react-server condition, because the import's
 * server modules begin with `import "server-only"`.
 */
import { spawn } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

export default async function importBench(): Promise<void> {
  const here = dirname(fileURLToPath(import.meta.url));
  const child = spawn(
    process.execPath,
    ["--conditions=react-server", "--import", "tsx", join(here, "import-child.ts")],
    {
      stdio: "inherit",
      env: process.env,
    },
  );
  const code = await new Promise<number | null>((resolve) => child.on("exit", resolve));
  if (code !== 0) console.log(`  import bench failed (exit ${code})`);
}
