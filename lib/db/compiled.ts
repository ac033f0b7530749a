import "server-only";
import type { Knex } from "knex";
import type { RowDataPacket } from "mysql2/promise";
import { mysqlPool } from "@/lib/db/knex";

type Param = string | number;
type Slot<P> = { param: keyof P } | { value: unknown };

/**
 * A read built with knex once and run as a server-side prepared statement ever after (mysql2
 * `execute`: binary protocol, the statement kept per connection). For the hottest reads, where
 * compiling the builder and escaping values on every request costs more than the query itself.
 *
 * `build` receives `sentinels`, one value per parameter, and must use each only as a bound value
 * (a `where`, a `?` binding), never inside SQL text; sentinels must differ from every other value
 * the query binds. At run time each binding equal to a sentinel takes the parameter's value.
 * Rows come back as the binary protocol gives them: DOUBLEs as numbers, text as strings.
 */
export function compiledRead<P extends Record<string, Param>, R>(
  sentinels: P,
  build: (p: P) => Knex.QueryBuilder,
): (values: P) => Promise<R[]> {
  let plan: { sql: string; slots: Array<Slot<P>> } | null = null;
  const compile = () => {
    const native = build(sentinels).toSQL().toNative();
    const byValue = new Map<unknown, keyof P>(Object.entries(sentinels).map(([k, v]) => [v, k]));
    const slots = native.bindings.map((b): Slot<P> => {
      const param = byValue.get(b);
      return param === undefined ? { value: b } : { param };
    });
    const used = new Set(slots.flatMap((s) => ("param" in s ? [s.param] : [])));
    const unused = Object.keys(sentinels).filter((k) => !used.has(k));
    if (unused.length > 0) throw new Error(`compiledRead: parameter(s) ${unused.join(", ")} not bound by the query`);
    return { sql: native.sql, slots };
  };
  return async (values) => {
    plan ??= compile();
    const bindings = plan.slots.map((s) => ("param" in s ? values[s.param] : s.value));
    const [rows] = await mysqlPool().execute<RowDataPacket[]>(plan.sql, bindings as Param[]);
    return rows as unknown as R[];
  };
}
