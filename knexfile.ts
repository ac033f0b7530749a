/*
 * Stock knex CLI with this TypeScript knexfile:
 *   tsx --conditions=react-server node_modules/knex/bin/cli.js migrate:latest --knexfile knexfile.ts
 * (npm run db:migrate / db:seed do exactly that.)
 */
import type { Knex } from "knex";
import { knexConfig } from "./lib/db/knex";

const config: Knex.Config = {
  ...knexConfig(),
  migrations: {
    directory: "./db/migrations",
    tableName: "knex_migrations",
    extension: "ts",
    loadExtensions: [".ts"],
  },
  seeds: {
    directory: "./db/seeds",
    extension: "ts",
    loadExtensions: [".ts"],
  },
};

export default config;
