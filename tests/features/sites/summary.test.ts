import { beforeAll, describe, expect, test } from "vitest";
import { GET } from "@/app/api/sites/route";
import { db } from "@/lib/db/knex";
import { MEASURE_COLUMNS, TRACER_SLOTS } from "@/lib/evenings/load";
import type { HalfHourTable } from "@/lib/series/types";
import { DEMO_GROUP_NAME, DEMO_SITE } from "@/lib/demo/scenario";
import type { LabelKey } from "@/lib/ui/label-badge";
import { seedDemoData } from "@/db/seeds/02_demo_data";
import type { LabelCounts, SiteCoverage, SiteSummary } from "@/features/sites/schemas";
import { deleteSiteAction } from "@/features/sites/server/actions";
import { listSites } from "@/features/sites/server/queries";
import { deleteImportAction } from "@/features/imports/server/actions";
import { planColumns, writeHalfHours } from "@/features/imports/server/write";
import { clientFor, createSiteFor, createUserWithGroup } from "@/tests/support/db";
import { analystWithSite, importFile, syntheticCsv } from "@/tests/features/imports/helpers";

const HALF_HOUR_MS = 30 * 60_000;
const START = Date.parse("2024-03-01T00:00:00Z");

/**
 * `slots` half-hours after START, written by the import write (as an import without overlap
 * would, so the stored coverage follows); slots in `empty` have every value missing (a file's
 * missing code).
 */
async function insertHalfHours(siteId: number, slots: readonly number[], empty: readonly number[] = []) {
  const values = (v: number) => Float64Array.from(slots, (i) => (empty.includes(i) ? NaN : v));
  const table: HalfHourTable = {
    startMs: Float64Array.from(slots, (i) => START + i * HALF_HOUR_MS),
    periodMinutes: 30,
    columns: { WS: values(1.5), W_SIGMA: values(0.3), O3: values(12) },
    units: { WS: "m s-1", W_SIGMA: "m s-1", O3: "ppb" },
  };
  const plan = planColumns(table, new Map([["O3", 2]]));
  await db.transaction((trx) => writeHalfHours(trx, siteId, 0, table, plan, null));
}

/** Evenings with an automatic label and, where given, an override on top. */
async function insertEvenings(siteId: number, evenings: ReadonlyArray<{ auto: LabelKey; final?: LabelKey }>) {
  await db("evenings").insert(
    evenings.map((e, i) => ({
      site_id: siteId,
      local_date: new Date(START + i * 86_400_000).toISOString().slice(0, 10),
      auto_label: e.auto,
      final_label: e.final ?? e.auto,
      label_source: e.final ? "override" : "auto",
      override_note: e.final ? "synthetic test override" : null,
      reasons: JSON.stringify([]),
      margins: JSON.stringify({}),
      metrics: JSON.stringify({}),
    })),
  );
}

/** The counts straight from SQL, for comparison with the summary. */
async function sqlCounts(siteId: number) {
  const [labelRows] = (await db.raw(
    "SELECT final_label AS label, COUNT(*) AS n FROM evenings WHERE site_id = ? GROUP BY final_label",
    [siteId],
  )) as [Array<{ label: LabelKey; n: number }>];
  const [[hh]] = (await db.raw(
    `SELECT MIN(start_utc) AS first_utc, MAX(start_utc) AS last_utc,
            SUM(ws IS NOT NULL OR wd IS NOT NULL OR ustar IS NOT NULL OR w_sigma IS NOT NULL OR h IS NOT NULL
                OR le IS NOT NULL OR ta IS NOT NULL OR pa IS NOT NULL OR rh IS NOT NULL OR vpd IS NOT NULL
                OR zl IS NOT NULL OR mo_length IS NOT NULL OR fc IS NOT NULL OR co2 IS NOT NULL OR sw_in IS NOT NULL
                OR tracer_1 IS NOT NULL OR tracer_2 IS NOT NULL OR tracer_3 IS NOT NULL OR tracer_4 IS NOT NULL
                OR tracer_5 IS NOT NULL OR tracer_6 IS NOT NULL OR tracer_7 IS NOT NULL OR tracer_8 IS NOT NULL) AS present,
            TIMESTAMPDIFF(MINUTE, MIN(start_utc), MAX(start_utc)) DIV 30 + 1 AS span
       FROM half_hours WHERE site_id = ?`,
    [siteId],
  )) as [[{ first_utc: Date | null; last_utc: Date | null; present: number | null; span: number | null }]];
  const labels: LabelCounts = { local: 0, stagnant: 0, advective: 0, unclassified: 0 };
  for (const r of labelRows) labels[r.label] = Number(r.n);
  return {
    labels,
    evenings: labelRows.reduce((sum, r) => sum + Number(r.n), 0),
    firstUtc: hh.first_utc?.toISOString() ?? null,
    lastUtc: hh.last_utc?.toISOString() ?? null,
    present: Number(hh.present ?? 0),
    span: Number(hh.span ?? 0),
  };
}

function expectMatchesSql(summary: SiteSummary | undefined, sql: Awaited<ReturnType<typeof sqlCounts>>) {
  expect(summary?.labelCounts).toEqual(sql.labels);
  expect(summary?.coverage).toEqual({
    firstUtc: sql.firstUtc,
    lastUtc: sql.lastUtc,
    presentHalfHours: sql.present,
    spanHalfHours: sql.span,
    share: sql.present / sql.span,
    evenings: sql.evenings,
  });
}

/*
 * The site list's coverage as it was computed before site_coverage existed: a scan of every
 * stored half-hour of the group's sites on each load. Kept here as the reference the stored
 * summary must equal.
 */
const VALUE_COLUMNS = [
  ...Object.values(MEASURE_COLUMNS),
  ...Array.from({ length: TRACER_SLOTS }, (_, i) => `tracer_${i + 1}`),
];
type FullScanRow = { site_id: number; first_utc: Date; last_utc: Date; present: number | string };

async function fullScanCoverage(groupId: number): Promise<Map<number, Omit<SiteCoverage, "evenings">>> {
  const rows = await db("half_hours")
    .whereIn("site_id", db("sites").select("id").where({ group_id: groupId }))
    .groupBy("site_id")
    .select<FullScanRow[]>(
      "site_id",
      db.raw("MIN(start_utc) AS first_utc"),
      db.raw("MAX(start_utc) AS last_utc"),
      db.raw(`COUNT(COALESCE(${VALUE_COLUMNS.map(() => "??").join(", ")})) AS present`, VALUE_COLUMNS),
    );
  return new Map(
    rows.map((c) => {
      const spanHalfHours = Math.round((c.last_utc.getTime() - c.first_utc.getTime()) / HALF_HOUR_MS) + 1;
      const presentHalfHours = Number(c.present);
      return [
        c.site_id,
        {
          firstUtc: c.first_utc.toISOString(),
          lastUtc: c.last_utc.toISOString(),
          presentHalfHours,
          spanHalfHours,
          share: presentHalfHours / spanHalfHours,
        },
      ];
    }),
  );
}

/** Every card of the group shows the coverage the full scan gives (null where it finds no rows). */
async function expectCardsMatchFullScan(groupId: number): Promise<SiteSummary[]> {
  const [sites, reference] = await Promise.all([listSites(groupId), fullScanCoverage(groupId)]);
  for (const site of sites) {
    const want = reference.get(site.id);
    if (want) expect(site.coverage, site.name).toEqual({ ...want, evenings: site.coverage?.evenings });
    else expect(site.coverage, site.name).toBeNull();
  }
  return sites;
}

/** Every `every`-th data line of a CSV with all values at the missing code: stored, but not present. */
function blankEvery(csv: string, every: number): string {
  const [header = "", ...lines] = csv.split("\n");
  return [
    header,
    ...lines.map((line, i) => {
      if (i % every !== 0 || line === "") return line;
      const [start, end, ...values] = line.split(",");
      return [start, end, ...values.map(() => "-9999")].join(",");
    }),
  ].join("\n");
}

/** Number of SQL statements `fn` sends through the app's pool. */
async function countQueries(fn: () => Promise<unknown>): Promise<number> {
  let n = 0;
  const listener = () => void n++;
  db.on("query", listener);
  try {
    await fn();
  } finally {
    db.off("query", listener);
  }
  return n;
}

describe("site summaries on the list", () => {
  let groupId: number;
  let withData: number;
  let withoutData: number;
  let otherGroupsSite: number;

  beforeAll(async () => {
    const { group } = await createUserWithGroup({ role: "viewer" });
    groupId = group.id;
    withData = (await createSiteFor(groupId, { name: "A tower with data" })).id;
    withoutData = (await createSiteFor(groupId, { name: "B tower without data" })).id;
    // 10 half-hours from first to last: two not stored at all, one stored with every value missing.
    await insertHalfHours(withData, [0, 1, 2, 3, 5, 6, 8, 9], [2]);
    await insertEvenings(withData, [
      { auto: "local" },
      { auto: "local" },
      { auto: "local" },
      { auto: "stagnant", final: "advective" },
      { auto: "advective" },
      { auto: "unclassified" },
      { auto: "unclassified" },
    ]);
    const other = await createUserWithGroup();
    otherGroupsSite = (await createSiteFor(other.group.id)).id;
    await insertHalfHours(otherGroupsSite, [0, 1, 2]);
    await insertEvenings(otherGroupsSite, [{ auto: "stagnant" }]);
  });

  test("coverage and label counts of a site with data, by final label", async () => {
    const sites = await listSites(groupId);
    expect(sites.map((s) => s.id)).toEqual([withData, withoutData]);
    const a = sites[0];
    // Hand count of the fixture above.
    expect(a?.labelCounts).toEqual({ local: 3, stagnant: 0, advective: 2, unclassified: 2 });
    expect(a?.coverage).toEqual({
      firstUtc: "2024-03-01T00:00:00.000Z",
      lastUtc: "2024-03-01T04:30:00.000Z",
      presentHalfHours: 7,
      spanHalfHours: 10,
      share: 0.7,
      evenings: 7,
    });
    expectMatchesSql(a, await sqlCounts(withData));
  });

  test("a site without data or evenings has neither summary", async () => {
    const b = (await listSites(groupId)).find((s) => s.id === withoutData);
    expect(b).toMatchObject({ coverage: null, labelCounts: null });
  });

  test("GET /api/sites carries the same summaries", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const site = await createSiteFor(group.id);
    await insertHalfHours(site.id, [0, 47]);
    await insertEvenings(site.id, [{ auto: "stagnant" }, { auto: "local", final: "stagnant" }]);
    const client = await clientFor(user, { groupId: group.id });
    const res = await client.call(() => GET(new Request("http://localhost:3000/api/sites")));
    expect(res.status).toBe(200);
    const { sites } = (await res.json()) as { sites: SiteSummary[] };
    expect(sites).toHaveLength(1);
    expect(sites[0]?.labelCounts).toEqual({ local: 0, stagnant: 2, advective: 0, unclassified: 0 });
    expect(sites[0]?.coverage).toMatchObject({ presentHalfHours: 2, spanHalfHours: 48, evenings: 2 });
    expectMatchesSql(sites[0], await sqlCounts(site.id));
  });

  test("the number of queries does not grow with the number of sites", async () => {
    const few = await createUserWithGroup();
    await createSiteFor(few.group.id);
    const many = await createUserWithGroup();
    for (let i = 0; i < 5; i++) {
      const s = await createSiteFor(many.group.id);
      await insertHalfHours(s.id, [0, 1]);
      await insertEvenings(s.id, [{ auto: "local" }]);
    }
    const oneSite = await countQueries(() => listSites(few.group.id));
    const fiveSites = await countQueries(() => listSites(many.group.id));
    expect(fiveSites).toBe(oneSite);
    expect(fiveSites).toBe(3);
  });
});

// The demo scenario's synthetic two years (with two invented outages), as `npm run db:seed` stores them.
describe("site summary on the demo data", () => {
  test("counts equal a direct SQL count", { timeout: 600_000 }, async () => {
    await seedDemoData(db);
    const g: { id: number } = await db("research_groups").where({ name: DEMO_GROUP_NAME }).first("id");
    const s: { id: number } = await db("sites").where({ group_id: g.id, name: DEMO_SITE.name }).first("id");
    const summary = (await listSites(g.id)).find((x) => x.id === s.id);
    const sql = await sqlCounts(s.id);
    expect(sql.evenings).toBeGreaterThan(700);
    expect(sql.present).toBeLessThan(sql.span);
    expectMatchesSql(summary, sql);
    await expectCardsMatchFullScan(g.id);
  });
});

// SYNTHETIC files (lib/synthetic, invented data) through the real upload and import job.
describe("stored coverage follows every write of half-hours", () => {
  test(
    "after an import, a replace over an overlap, a keep, a second site and a delete",
    { timeout: 300_000 },
    async () => {
      const { client, site, groupId } = await analystWithSite("lead");

      // four days with every 5th period missing in full
      const first = await importFile(
        client,
        site.id,
        blankEvery(syntheticCsv(4, { startDate: "2022-03-01" }), 5),
      );
      expect(first.imp.status).toBe("landed");
      const afterFirst = (await expectCardsMatchFullScan(groupId))[0]?.coverage;
      expect(afterFirst).toMatchObject({
        spanHalfHours: 4 * 48,
        presentHalfHours: 4 * 48 - Math.ceil((4 * 48) / 5),
      });

      // replace: two days inside and two after, complete, so the replaced periods gain values
      const replacing = syntheticCsv(4, { startDate: "2022-03-03", seed: 3 });
      const replaced = await importFile(client, site.id, replacing, { settings: { overlap: "replace" } });
      expect(replaced.imp).toMatchObject({ status: "landed", overlapChoice: "replace" });
      const afterReplace = (await expectCardsMatchFullScan(groupId))[0]?.coverage;
      expect(afterReplace?.spanHalfHours).toBe(6 * 48);
      expect(afterReplace?.presentHalfHours).toBeGreaterThan((afterFirst?.presentHalfHours ?? 0) + 2 * 48);

      // replace again with gaps over the middle: stored periods lose their values
      const gappy = blankEvery(syntheticCsv(2, { startDate: "2022-03-02", seed: 4 }), 2);
      await importFile(client, site.id, gappy, { settings: { overlap: "replace" } });
      const afterGaps = (await expectCardsMatchFullScan(groupId))[0]?.coverage;
      expect(afterGaps?.presentHalfHours).toBeLessThan(afterReplace?.presentHalfHours ?? 0);

      // keep: a file reaching a day earlier only adds that day
      const kept = await importFile(client, site.id, syntheticCsv(3, { startDate: "2022-02-28", seed: 5 }), {
        settings: { overlap: "keep" },
      });
      expect(kept.imp).toMatchObject({ status: "landed", rowsWritten: 48 });
      expect((await expectCardsMatchFullScan(groupId))[0]?.coverage?.spanHalfHours).toBe(7 * 48);

      // a second site of the group gets its own coverage; the first one's stays as it was
      const before = (await listSites(groupId))[0]?.coverage;
      const second = await createSiteFor(groupId, { name: `${site.name} (second)`, utc_offset_hours: 1 });
      expect((await expectCardsMatchFullScan(groupId)).find((s) => s.id === second.id)?.coverage).toBeNull();
      await importFile(client, second.id, syntheticCsv(2, { startDate: "2023-07-01", seed: 9 }));
      const both = await expectCardsMatchFullScan(groupId);
      expect(both.find((s) => s.id === site.id)?.coverage).toEqual(before);
      expect(both.find((s) => s.id === second.id)?.coverage).toMatchObject({ spanHalfHours: 2 * 48 });

      // deleting the import that holds the first day moves the start; deleting the rest empties the card
      const del = await client.call(() => deleteImportAction(site.id, kept.imp.id, false));
      expect(del).toMatchObject({ ok: true });
      const afterDelete = (await expectCardsMatchFullScan(groupId)).find((s) => s.id === site.id)?.coverage;
      expect(afterDelete?.firstUtc).toBe(afterFirst?.firstUtc);
      for (const imp of [first.imp, replaced.imp]) {
        expect(await client.call(() => deleteImportAction(site.id, imp.id, false))).toMatchObject({
          ok: true,
        });
        await expectCardsMatchFullScan(groupId);
      }
      const gappyImport: { id: number } = await db("imports")
        .where({ site_id: site.id, status: "landed" })
        .first("id");
      expect(await client.call(() => deleteImportAction(site.id, gappyImport.id, false))).toMatchObject({
        ok: true,
      });
      expect((await expectCardsMatchFullScan(groupId)).find((s) => s.id === site.id)?.coverage).toBeNull();

      // a deleted site takes its summary with it
      expect(await client.call(() => deleteSiteAction(second.id))).toMatchObject({ ok: true });
      expect(await db("site_coverage").where({ site_id: second.id }).first()).toBeUndefined();
    },
  );
});
