/*
 * Makes sure Debian's chromium is present for the browser tests (apt-get when missing and root).
 *   tsx scripts/chromium.ts
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { pathToFileURL } from "node:url";

export const CHROMIUM_PATH = "/usr/bin/chromium";

export function ensureChromium(): void {
  if (existsSync(CHROMIUM_PATH)) return;
  if (process.getuid?.() !== 0) {
    throw new Error(
      `${CHROMIUM_PATH} is missing and this is not root. Install it with \`sudo apt-get install chromium\`.`,
    );
  }
  console.log("[chromium] not found; installing Debian's chromium (apt-get)...");
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  const update = spawnSync("apt-get", ["-q", "update"], { stdio: "inherit", env });
  if (update.status !== 0) throw new Error("apt-get update failed; see the output above.");
  const install = spawnSync("apt-get", ["-q", "install", "-y", "--no-install-recommends", "chromium"], {
    stdio: "inherit",
    env,
  });
  if (install.status !== 0 || !existsSync(CHROMIUM_PATH)) {
    throw new Error("Installing chromium failed; see the apt-get output above.");
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  try {
    ensureChromium();
  } catch (err) {
    console.error(`[chromium] ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
