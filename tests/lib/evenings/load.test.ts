import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/lib/db/knex";
import { loadHalfHours } from "@/lib/evenings/load";
import { localMidnightUtcMs } from "@/lib/physics/sun";
import { generateSynthetic } from "@/lib/synthetic/generator";
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
});
