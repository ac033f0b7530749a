import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";

/*
 * A change stamp of stored evenings, read from the rows themselves instead of a counter that
 * every writer would have to bump (a shared counter row would also be locked by every override
 * and recompute of a site until commit, and they lock rows in different orders).
 *
 * The stamp is COUNT(*), SUM(id) and SUM(version) of the evenings in scope. It rests on two
 * invariants of the evenings table: every change to a row bumps its `version` (overrides,
 * reverts, reviewed marks and recomputes all do), and ids come from AUTO_INCREMENT, so a row
 * inserted later has a larger id than every row before it. Between an earlier and a later state
 * with the same count and the same SUM(id), no row can have been replaced by another (a newcomer's
 * id exceeds every id it could replace), so the set of rows is the same; then each version can
 * only have grown, and equal sums mean equal versions: the same stamp means the same content.
 * The stamp must be read in the same snapshot as the data it describes (one transaction), or
 * before the data, never after.
 */

/** Which evenings a stamp covers: sites and an optional inclusive range of local dates (YYYY-MM-DD). */
export type StampScope = { siteIds: readonly number[]; from?: string | null; to?: string | null };

/**
 * The query of the change stamp of the evenings in `scope`: one row, one column `stamp`. Other
 * queries can select it as a subquery (`stampQuery(scope).as("stamp")`) to read it in the same
 * round trip as what they read.
 */
export function stampQuery(scope: StampScope, q: Knex | Knex.Transaction = db): Knex.QueryBuilder {
  const query = q("evenings")
    .whereIn("site_id", [...scope.siteIds])
    .select(q.raw("CONCAT(COUNT(*), '.', COALESCE(SUM(id), 0), '.', COALESCE(SUM(version), 0)) AS stamp"));
  if (scope.from) query.where("local_date", ">=", scope.from);
  if (scope.to) query.where("local_date", "<=", scope.to);
  return query;
}

/**
 * The change stamp of the evenings in `scope`, as text ("count.sumId.sumVersion"). Equal stamps
 * of one scope mean equal stored evenings. Pass `q` (a transaction) to read it in the snapshot
 * of the data it stands for.
 */
export async function eveningsStamp(scope: StampScope, q: Knex | Knex.Transaction = db): Promise<string> {
  const row = (await stampQuery(scope, q).first()) as { stamp: string } | undefined;
  return row?.stamp ?? "0.0.0";
}

type Entry<V> = { stamp: string; value: V; bytes: number };

/**
 * A bounded in-process cache whose entries are valid only for the stamp they were built at.
 * Lookups name the current stamp; an entry of any other stamp is a miss and is rebuilt, so
 * nothing stale is served. Concurrent misses of one key and stamp share one build. Least
 * recently used entries go first once `maxEntries` or `maxBytes` is exceeded.
 */
export class StampedCache<V> {
  private readonly entries = new Map<string, Entry<V>>();
  private readonly building = new Map<string, Promise<Entry<V>>>();
  private bytes = 0;

  constructor(
    private readonly maxEntries: number,
    private readonly maxBytes: number,
  ) {}

  /**
   * The value of `key` at `stamp`, built with `build` when missing. `build` returns the value,
   * its size in bytes, and the stamp it was actually read at (which may be newer than `stamp`:
   * the entry is then stored under the newer one, and the caller still gets data at least as new
   * as the stamp it asked for).
   */
  async get(key: string, stamp: string, build: () => Promise<Entry<V>>): Promise<V> {
    const hit = this.entries.get(key);
    if (hit && hit.stamp === stamp) {
      // Map order is insertion order: re-inserting makes it the most recently used.
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit.value;
    }
    const flight = `${key}\u0000${stamp}`;
    let pending = this.building.get(flight);
    if (!pending) {
      pending = build().finally(() => this.building.delete(flight));
      this.building.set(flight, pending);
      void pending.then((e) => this.store(key, e), () => undefined);
    }
    return (await pending).value;
  }

  /** Forgets every entry (tests; nothing else needs it, stale entries are never served). */
  clear(): void {
    this.entries.clear();
    this.bytes = 0;
  }

  /** Number of entries held. */
  get size(): number {
    return this.entries.size;
  }

  private store(key: string, e: Entry<V>): void {
    if (e.bytes > this.maxBytes) return;
    const old = this.entries.get(key);
    if (old) {
      this.bytes -= old.bytes;
      this.entries.delete(key);
    }
    this.entries.set(key, e);
    this.bytes += e.bytes;
    for (const [k, v] of this.entries) {
      if (this.entries.size <= this.maxEntries && this.bytes <= this.maxBytes) break;
      this.entries.delete(k);
      this.bytes -= v.bytes;
    }
  }
}
