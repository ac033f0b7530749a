/*
 * Node flags of the production web server (`next start` under `npm start`; the review and load
 * benchmarks start it the same way). A larger young generation (semi-space 32 MB instead of 16)
 * halves the minor collections a busy server runs: every request allocates its Request, headers
 * and JSON, and the review benchmark served about 10 % more requests per CPU second with it. The
 * cost is up to ~50 MB more resident memory under load.
 */
export const WEB_NODE_FLAGS: readonly string[] = ["--max-semi-space-size=32"];
