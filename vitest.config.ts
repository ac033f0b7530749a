import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

export default defineConfig({
  resolve: {
    alias: {
      "@": fileURLToPath(new URL("./", import.meta.url)),
      // server-only throws outside a React server bundle; tests import server modules directly.
      "server-only": fileURLToPath(new URL("./tests/support/server-only.ts", import.meta.url)),
    },
  },
  test: {
    include: ["tests/**/*.test.ts", "tests/**/*.test.tsx"],
    exclude: ["node_modules", ".data", ".next"],
    // knex migrations/seeds are TypeScript and need the tsx loader in forks.
    execArgv: ["--import", "tsx"],
    // A fresh, migrated database per run; workers get its URL through inject("databaseUrl").
    globalSetup: ["./tests/global-setup.ts"],
    setupFiles: ["./tests/setup.ts"],
    testTimeout: 30_000,
    // Browser tests build the app once per run inside a beforeAll.
    hookTimeout: 600_000,
  },
});
