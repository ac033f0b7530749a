/*
 * Runs scripts/worker.ts as a child of `npm start` / `npm run dev`: restarted when it dies on
 * its own, stopped together with the web server. In dev it runs under `tsx watch`, so edits
 * to job code restart it (an interrupted job is re-queued).
 */
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

const RESTART_DELAY_MS = 3000;
const STOP_TIMEOUT_MS = 20_000;

export interface SupervisedWorker {
  /** Signals the worker and resolves once it has exited (SIGKILL after a timeout). */
  stop(signal?: NodeJS.Signals): Promise<void>;
}

export function superviseWorker(opts: { dev: boolean; env: NodeJS.ProcessEnv; log: (msg: string) => void }): SupervisedWorker {
  const root = process.cwd();
  const tsxCli = path.join(root, "node_modules", "tsx", "dist", "cli.mjs");
  const script = path.join(root, "scripts", "worker.ts");
  const args = opts.dev
    ? [tsxCli, "watch", "--clear-screen=false", "--conditions=react-server", script]
    : ["--conditions=react-server", "--import", "tsx", script];
  let child: ChildProcess | null = null;
  let stopping = false;

  const launch = () => {
    const c = spawn(process.execPath, args, { stdio: "inherit", env: opts.env });
    child = c;
    c.on("exit", (code, signal) => {
      if (child === c) child = null;
      if (stopping) return;
      opts.log(`worker exited (${signal ?? `code ${code}`}); restarting in ${RESTART_DELAY_MS / 1000} s`);
      setTimeout(() => {
        if (!stopping) launch();
      }, RESTART_DELAY_MS).unref();
    });
  };
  launch();

  return {
    stop(signal = "SIGTERM") {
      stopping = true;
      const c = child;
      if (!c || c.exitCode !== null || c.signalCode !== null) return Promise.resolve();
      return new Promise((resolve) => {
        const kill = setTimeout(() => c.kill("SIGKILL"), STOP_TIMEOUT_MS);
        c.once("exit", () => {
          clearTimeout(kill);
          resolve();
        });
        c.kill(signal);
      });
    },
  };
}
