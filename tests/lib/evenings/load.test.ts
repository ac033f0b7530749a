import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/lib/db/knex";
import { loadHalfHours } from "@/lib/evenings/load";
import { localMidnightUtcMs } from "@/lib/physics/sun";
import { generateSynthetic } from "@/lib/synthetic/generator";
import type { InsertRow } from "@/lib/db/tables";
import type { HalfHourTable } from "@/lib/series/types";
import { createGroup, createSiteFor, type SiteRow } from "@/tests/support/db";
import { paramsOf, storeTable } from "@/tests/lib/evenings/helpers";

let site: SiteRow;
let table: HalfHourTable;
const DAY = 86_400_000;

beforeAll(async () => {
  const group = await createGroup();
  site = await createSiteFor(group.id, { latitude: 46.3, longitude: 7.6, utc_offset_hours: 1 });
  // SYNTHETIC data (lib/synthetic), with gaps and a tracer; no measurement involved
  table = generateSynthetic({
    site: paramsOf(site),
    startDate: "2025-05-01",
    days: 6,
    seed: 11,
    gapFraction: 0.05,
    tracers: ["O3"],
    omit: ["ZL"],
  }).table;
  await storeTable(site.id, table, { O3: 3 });
});

// MariaDB's text protocol prints DOUBLE with up to 17 significant digits; a value may come back
// one unit in the last place away, never more.
function sameValues(a: Float64Array | undefined, b: Float64Array | undefined) {
  expect(a).toBeDefined();
  expect(a?.length).toBe(b?.length);
  for (let i = 0; i < (b?.length ?? 0); i++) {
    const x = a?.[i] as number;
    const y = b?.[i] as number;
    if (Number.isNaN(y)) expect(x).toBeNaN();
    else expect(Math.abs(x - y)).toBeLessThanOrEqual(Math.abs(y) * 4e-16);
  }
}

describe("loadHalfHours", () => {
  it("reads back the stored table in canonical units, NULL as NaN, tracers by name", async () => {
    const t = await loadHalfHours(site.id, table.startMs[0] as number, (table.startMs.at(-1) as number) + 1);
    expect(t.periodMinutes).toBe(30);
    expect(Array.from(t.startMs)).toEqual(Array.from(table.startMs));
    for (const name of ["WS", "USTAR", "W_SIGMA", "H", "TA", "PA", "RH", "O3"]) sameValues(t.columns[name], table.columns[name]);
    expect(t.units.O3).toBe(table.units.O3 ?? "nmol mol-1");
    expect(t.units.WS).toBe("m s-1");
    // columns never stored are absent, not all-NaN
    expect(t.columns.ZL).toBeUndefined();
    expect(t.columns.MO_LENGTH).toBeUndefined();
    expect(Object.keys(t.columns)).not.toContain("tracer_3");
  });

  it("reads only the asked period [from, to)", async () => {
    const from = localMidnightUtcMs("2025-05-03", 1);
    const t = await loadHalfHours(site.id, from, from + DAY);
    expect(t.startMs.length).toBe(48);
    expect(t.startMs[0]).toBe(from);
    expect(t.startMs.at(-1)).toBe(from + DAY - 30 * 60_000);
  });

  it("gives an empty table for a period without data", async () => {
    const t = await loadHalfHours(site.id, Date.UTC(1990, 0, 1), Date.UTC(1990, 0, 2));
    expect(t.startMs.length).toBe(0);
    expect(Object.keys(t.columns)).toEqual([]);
    const other = await createSiteFor(site.group_id);
    expect((await loadHalfHours(other.id, 0, Date.UTC(2100, 0, 1))).startMs.length).toBe(0);
    expect(await db("half_hours").where({ site_id: other.id }).count({ n: "*" }).first()).toEqual({ n: 0 });
  });

  it("reads inside the caller's transaction, seeing its rows not yet committed", async () => {
    const other = await createSiteFor(site.group_id);
    const start = Date.UTC(2025, 5, 1, 18, 0);
    // values chosen to need all 17 significant digits (common practice: IEEE 754 round trip)
    const ws = 0.1 + 0.2;
    const ta = -1 / 3;
    const trx = await db.transaction();
    try {
      await trx("half_hours").insert([
        { site_id: other.id, start_utc: new Date(start), ws, ta },
        { site_id: other.id, start_utc: new Date(start + 30 * 60_000), ws: null, ta: 1e-300 },
      ] as Array<InsertRow<"half_hours">>);
      const t = await loadHalfHours(other.id, start, start + DAY, trx);
      expect(Array.from(t.startMs)).toEqual([start, start + 30 * 60_000]);
      expect(t.columns.WS?.[0]).toBe(ws);
      expect(t.columns.WS?.[1]).toBeNaN();
      expect(Array.from(t.columns.TA ?? [])).toEqual([ta, 1e-300]);
      expect(Object.keys(t.columns).sort()).toEqual(["TA", "WS"]);
    } finally {
      await trx.rollback();
    }
    expect((await loadHalfHours(other.id, start, start + DAY)).startMs.length).toBe(0);
  });

  it("gives its pooled connection back, also when many reads run at once", async () => {
    const from = table.startMs[0] as number;
    const to = (table.startMs.at(-1) as number) + 1;
    // more reads than the pool has connections (10): a connection kept would stall the rest
    const lengths = await Promise.all(Array.from({ length: 25 }, () => loadHalfHours(site.id, from, to).then((t) => t.startMs.length)));
    expect(new Set(lengths)).toEqual(new Set([table.startMs.length]));
  });
});
