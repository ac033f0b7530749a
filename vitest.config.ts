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
    testTimeout: 30_000,
    hookTimeout: 120_000,
  },
});
