// ESLint flat config: Next's rules, typescript-eslint (type-checked), and the import
// direction lib -> features -> app, with no feature importing another.
import { readdirSync } from "node:fs";
import nextCoreWebVitals from "eslint-config-next/core-web-vitals";
import nextTypescript from "eslint-config-next/typescript";
import tseslint from "typescript-eslint";

const features = readdirSync(new URL("./features", import.meta.url), { withFileTypes: true })
  .filter((d) => d.isDirectory())
  .map((d) => d.name);

const pureFolders = ["lib/physics", "lib/classify", "lib/series"];

export default tseslint.config(
  {
    ignores: [
      ".next/**",
      "node_modules/**",
      ".data/**",
      "test-results/**",
      "coverage/**",
      "next-env.d.ts",
    ],
  },
  ...nextCoreWebVitals,
  ...nextTypescript,
  {
    files: ["**/*.{ts,tsx}"],
    extends: [tseslint.configs.recommendedTypeChecked],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      "@typescript-eslint/consistent-type-imports": ["error", { fixStyle: "inline-type-imports" }],
      "@typescript-eslint/no-explicit-any": "error",
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      // Server actions and route handlers are async by contract even when they do not await.
      "@typescript-eslint/require-await": "off",
      "import/no-restricted-paths": [
        "error",
        {
          zones: [
            { target: "./lib", from: ["./features", "./app"], message: "lib must not import features or app." },
            { target: "./features", from: "./app", message: "features must not import app." },
            ...features.map((name) => ({
              target: `./features/${name}`,
              from: "./features",
              except: [`./${name}`],
              message: "A feature must not import another feature; compose them in app/.",
            })),
          ],
        },
      ],
    },
  },
  {
    // Tests and scripts are leaves: nothing imports them, so cycles are checked where they can occur.
    files: ["app/**/*.{ts,tsx}", "features/**/*.{ts,tsx}", "lib/**/*.{ts,tsx}"],
    rules: { "import/no-cycle": ["error", { ignoreExternal: true }] },
  },
  {
    files: pureFolders.map((f) => `${f}/**/*.ts`),
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            { group: ["next", "next/*", "react", "react/*", "react-dom", "knex", "mysql2", "mysql2/*", "server-only"], message: "lib/physics, lib/classify and lib/series stay pure." },
            { group: ["@/lib/db/*", "@/lib/auth/*", "@/lib/env"], message: "lib/physics, lib/classify and lib/series stay pure." },
          ],
        },
      ],
    },
  },
  {
    // expect.any() and friends are typed `any` by vitest.
    files: ["tests/**/*.{ts,tsx}"],
    rules: {
      "@typescript-eslint/no-unsafe-assignment": "off",
      "@typescript-eslint/no-unsafe-argument": "off",
    },
  },
  {
    files: ["**/*.{js,mjs,cjs}"],
    extends: [tseslint.configs.disableTypeChecked],
  },
);
