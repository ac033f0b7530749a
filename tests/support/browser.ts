/*
 * Browser tests: build the app once per test run (only when a browser test asks for it),
 * start `next start` on a free port against this run's database, and drive Debian's
 * chromium through playwright-core. Screenshots go to test-results/ (gitignored).
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, inject } from "vitest";
import { DEMO_PASSWORD } from "@/lib/demo/scenario";

const root = process.cwd();
export const RESULTS_DIR = path.join(root, "test-results");
export const CHROMIUM_PATH = "/usr/bin/chromium";
const NEXT_BIN = path.join(root, "node_modules", "next", "dist", "bin", "next");

const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
];

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Runs `next build` once per test run. Test files in parallel workers wait for the first
 * one; the lock is a directory because mkdir is atomic.
 */
export async function ensureBuilt(): Promise<void> {
  const runId = inject("testRunId");
  const dir = path.join(RESULTS_DIR, ".build");
  mkdirSync(dir, { recursive: true });
  const done = path.join(dir, `${runId}.done`);
  const failed = path.join(dir, `${runId}.failed`);
  const lock = path.join(dir, `${runId}.lock`);
  const deadline = Date.now() + 15 * 60_000;
  for (;;) {
    if (existsSync(done)) return;
    if (existsSync(failed)) throw new Error(readFileSync(failed, "utf8"));
    try {
      mkdirSync(lock);
      break;
    } catch {
      if (Date.now() > deadline) throw new Error("gave up waiting for another worker's next build");
      await sleep(500);
    }
  }
  // Earlier runs' markers are of no use now.
  for (const stale of readdirSafe(dir).filter((n) => !n.startsWith(`${runId}.`))) {
    rmSync(path.join(dir, stale), { recursive: true, force: true });
  }
  const logFile = path.join(RESULTS_DIR, "next-build.log");
  const r = spawnSync(process.execPath, [NEXT_BIN, "build"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
    encoding: "utf8",
    maxBuffer: 64 * 1024 * 1024,
  });
  writeFileSync(logFile, `${r.stdout}\n${r.stderr}`);
  if (r.status !== 0) {
    const msg = `next build failed (log in ${logFile}):\n${`${r.stdout}\n${r.stderr}`.trim().split("\n").slice(-40).join("\n")}`;
    writeFileSync(failed, msg);
    throw new Error(msg);
  }
  writeFileSync(done, new Date().toISOString());
}

function readdirSafe(dir: string): string[] {
  try {
    return readdirSync(dir);
  } catch {
    return [];
  }
}

/** A free TCP port on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.unref();
    srv.on("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const addr = srv.address();
      srv.close(() => (typeof addr === "object" && addr ? resolve(addr.port) : reject(new Error("no port"))));
    });
  });
}

export type RunningApp = { url: string; stop: () => Promise<void> };

/** Builds (once per run) and starts the app on a free port against this run's database. */
export async function startApp(opts: { env?: Record<string, string> } = {}): Promise<RunningApp> {
  await ensureBuilt();
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  let output = "";
  const child: ChildProcess = spawn(process.execPath, [NEXT_BIN, "start", "-p", String(port), "-H", "127.0.0.1"], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: "production",
      NEXT_TELEMETRY_DISABLED: "1",
      DATABASE_URL: inject("databaseUrl"),
      APP_URL: url,
      DEMO_MODE: "true",
      ...opts.env,
    },
    stdio: ["ignore", "pipe", "pipe"],
    detached: true,
  });
  child.stdout?.on("data", (d: Buffer) => (output += d.toString()));
  child.stderr?.on("data", (d: Buffer) => (output += d.toString()));

  const stop = async () => {
    if (child.exitCode !== null || child.pid === undefined) return;
    const exited = new Promise((r) => child.once("exit", r));
    try {
      process.kill(-child.pid, "SIGTERM");
    } catch {
      /* already gone */
    }
    await Promise.race([exited, sleep(5000)]);
    if (child.exitCode === null) {
      try {
        process.kill(-child.pid, "SIGKILL");
      } catch {
        /* already gone */
      }
    }
  };

  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`next start exited (${child.exitCode}):\n${output}`);
    try {
      await fetch(url, { redirect: "manual" });
      break;
    } catch {
      if (Date.now() > deadline) {
        await stop();
        throw new Error(`next start did not answer within 60 s:\n${output}`);
      }
      await sleep(200);
    }
  }
  return { url, stop };
}

export type BrowserSession = { context: BrowserContext; page: Page; close: () => Promise<void> };

/** Launches headless chromium with a throwaway profile; close() removes the profile. */
export async function launchBrowser(): Promise<BrowserSession> {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(`${CHROMIUM_PATH} is missing; \`npm test\` installs it (apt-get install chromium) when run as root.`);
  }
  const profile = mkdtempSync(path.join(tmpdir(), "gloaming-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: { width: 1280, height: 800 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Saves a full-page screenshot as test-results/<name>.png and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(RESULTS_DIR, { recursive: true });
  const file = path.join(RESULTS_DIR, `${name.replace(/[^A-Za-z0-9._-]+/g, "-")}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * Signs in through the sign-in form (the real server action) and waits for the page it leads to:
 * the site list unless `landing` says otherwise. The password defaults to the demo accounts' one.
 */
export async function signInAs(
  page: Page,
  appUrl: string,
  email: string,
  opts: { password?: string; landing?: RegExp | ((url: URL) => boolean) } = {},
): Promise<void> {
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password", { exact: true }).fill(opts.password ?? DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL(opts.landing ?? /\/sites$/);
}

/**
 * Hands the browser a session made in the database (`createSessionFor` of tests/support/db.ts),
 * and the active group when given, without going through the form.
 */
export async function addSessionCookies(
  context: BrowserContext,
  appUrl: string,
  session: { cookieName: string; cookieValue: string },
  groupId?: number,
): Promise<void> {
  await context.addCookies([
    { name: session.cookieName, value: session.cookieValue, url: appUrl },
    ...(groupId === undefined ? [] : [{ name: "gloaming_group", value: String(groupId), url: appUrl }]),
  ]);
}

export type AppInBrowser = { readonly app: RunningApp; readonly browser: BrowserSession };

/**
 * For a browser test file: before its tests, runs `prepare` (seeding), starts the app and a
 * browser, then `afterLaunch`; after them, closes both. Read `app` and `browser` inside tests only.
 */
export function appInBrowserForFile(
  opts: {
    prepare?: () => Promise<unknown>;
    afterLaunch?: (rig: AppInBrowser) => Promise<unknown>;
    env?: Record<string, string>;
    timeoutMs?: number;
  } = {},
): AppInBrowser {
  let app: RunningApp | undefined;
  let browser: BrowserSession | undefined;
  const rig: AppInBrowser = {
    get app() {
      if (!app) throw new Error("the app is not started yet (use it inside a test)");
      return app;
    },
    get browser() {
      if (!browser) throw new Error("the browser is not launched yet (use it inside a test)");
      return browser;
    },
  };
  beforeAll(async () => {
    await opts.prepare?.();
    app = await startApp(opts.env ? { env: opts.env } : {});
    browser = await launchBrowser();
    await opts.afterLaunch?.(rig);
  }, opts.timeoutMs);
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });
  return rig;
}
