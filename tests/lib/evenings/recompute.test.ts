import { beforeAll, describe, expect, it } from "vitest";
import { classifyTable } from "@/lib/classify/evenings";
import { DEFAULT_RULE_SET, type RuleSetInput } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import { jsonColumn } from "@/lib/db/json";
import { NO_DATA_REASON, recomputeEvenings } from "@/lib/evenings/recompute";
import { addRuleSetVersion, ensureActiveRuleSet, getActiveRuleSet, setActiveRuleSet } from "@/lib/evenings/rulesets";
import { localMidnightUtcMs } from "@/lib/physics/sun";
import { generateSynthetic, type EveningKind } from "@/lib/synthetic/generator";
import type { HalfHourTable } from "@/lib/series/types";
import { createGroup, createSiteFor, type SiteRow } from "@/tests/support/db";
import { paramsOf, storeTable } from "@/tests/lib/evenings/helpers";

type EveningRow = {
  id: number;
  d: string;
  auto_label: string;
  final_label: string;
  label_source: string;
  override_note: string | null;
  rule: string | null;
  reasons: unknown;
  metrics: unknown;
  sigma_w_evening: number | null;
  rule_set_version: number;
  version: number;
  computed_at: Date;
};

async function evenings(siteId: number): Promise<EveningRow[]> {
  const [rows] = (await db.raw(
    `SELECT id, DATE_FORMAT(local_date, '%Y-%m-%d') AS d, auto_label, final_label, label_source, override_note,
            rule, reasons, metrics, sigma_w_evening, rule_set_version, version, computed_at
       FROM evenings WHERE site_id = ? ORDER BY local_date`,
    [siteId],
  )) as [EveningRow[]];
  return rows;
}

async function eventsOf(eveningId: number) {
  return db("evening_events").where({ evening_id: eveningId }).orderBy("id").select("kind", "from_label", "to_label", "rule_set_version");
}

const START = "2025-06-01";
const DAYS = 30;
const FROM = "2025-06-03";
const TO = "2025-06-27";

// forced kinds so the synthetic month has all three (SYNTHETIC data, lib/synthetic)
const kinds: Record<string, EveningKind> = {};
for (let d = 0; d < DAYS; d++) {
  const date = new Date(Date.parse(`${START}T00:00:00Z`) + d * 86_400_000).toISOString().slice(0, 10);
  kinds[date] = (["local", "stagnant", "advective"] as const)[d % 3] as EveningKind;
}

let site: SiteRow;
let groupId: number;
let table: HalfHourTable;

beforeAll(async () => {
  groupId = (await createGroup()).id;
  site = await createSiteFor(groupId, { latitude: 47.1, longitude: 8.4, utc_offset_hours: 1, canopy_height_m: 18, measurement_height_m: 32 });
  table = generateSynthetic({ site: paramsOf(site), startDate: START, days: DAYS, seed: 2025, kinds }).table;
  await storeTable(site.id, table);
});

describe("rule sets", () => {
  it("gives a group without rule sets the default as version 1, once, even when asked concurrently", async () => {
    const g = await createGroup();
    const a = await createSiteFor(g.id);
    const b = await createSiteFor(g.id);
    expect(await getActiveRuleSet(a.id)).toBeNull();
    const got = await Promise.all([ensureActiveRuleSet(a.id), ensureActiveRuleSet(b.id), ensureActiveRuleSet(a.id)]);
    expect(new Set(got.map((r) => r.id)).size).toBe(1);
    expect(got[0]).toMatchObject({ groupId: g.id, version: 1, name: DEFAULT_RULE_SET.name });
    expect(got[0]?.definition.rules).toEqual(DEFAULT_RULE_SET.rules);
    expect(await db("rule_sets").where({ group_id: g.id }).count({ n: "*" }).first()).toEqual({ n: 1 });
    expect((await getActiveRuleSet(b.id))?.id).toBe(got[0]?.id);
  });

  it("numbers new versions per group and refuses to activate another group's rule set", async () => {
    const g = await createGroup();
    const s = await createSiteFor(g.id);
    const v1 = await ensureActiveRuleSet(s.id);
    const v2 = await addRuleSetVersion(g.id, { ...DEFAULT_RULE_SET, name: "Tuned" }, { comment: "tighter" });
    expect(v2).toMatchObject({ version: 2, name: "Tuned", comment: "tighter" });
    expect(v2.definition.version).toBe(2);
    expect((await getActiveRuleSet(s.id))?.id).toBe(v1.id);
    const foreign = await addRuleSetVersion((await createGroup()).id, DEFAULT_RULE_SET);
    await expect(setActiveRuleSet(s.id, foreign.id)).rejects.toThrow(/does not belong/);
    await setActiveRuleSet(s.id, v2.id);
    expect((await getActiveRuleSet(s.id))?.version).toBe(2);
  });
});

describe("recomputeEvenings", () => {
  it("stores the classifier's evenings for the period with the active rule set", async () => {
    const progress: Array<[number, number]> = [];
    const r = await recomputeEvenings(site.id, FROM, TO, { onProgress: (d, t) => void progress.push([d, t]) });
    const expected = classifyTable(table, paramsOf(site), DEFAULT_RULE_SET).filter((e) => e.date >= FROM && e.date <= TO);
    expect(expected).toHaveLength(25);
    expect(r).toMatchObject({ computed: 25, inserted: 25, updated: 0, unchanged: 0, from: FROM, to: TO, scope: "period", ruleSetVersion: 1 });
    expect(progress.at(-1)).toEqual([25, 25]);

    const rows = await evenings(site.id);
    expect(rows.map((e) => e.d)).toEqual(expected.map((e) => e.date));
    for (const [i, e] of expected.entries()) {
      const row = rows[i] as EveningRow;
      expect(row).toMatchObject({ auto_label: e.label, final_label: e.label, label_source: "auto", rule: e.rule, version: 1 });
      expect(jsonColumn(row.reasons)).toEqual(e.reasons);
      expect(row.sigma_w_evening).toBe(e.metrics.sigmaWEvening);
    }
    // a month of forced kinds: all three labels appear
    expect(new Set(rows.map((e) => e.auto_label))).toEqual(new Set(["local", "stagnant", "advective"]));
    expect(await eventsOf((rows[0] as EveningRow).id)).toEqual([
      { kind: "auto", from_label: null, to_label: rows[0]?.auto_label, rule_set_version: 1 },
    ]);
  });

  it("changes nothing when recomputed with identical data and rules", async () => {
    const before = await evenings(site.id);
    const eventsBefore = await db("evening_events").whereIn("evening_id", before.map((e) => e.id)).count({ n: "*" }).first();
    const r = await recomputeEvenings(site.id, FROM, TO);
    expect(r).toMatchObject({ computed: 25, inserted: 0, updated: 0, unchanged: 25, labelChanged: 0 });
    expect(await evenings(site.id)).toEqual(before);
    expect(await db("evening_events").whereIn("evening_id", before.map((e) => e.id)).count({ n: "*" }).first()).toEqual(eventsBefore);
  });

  it("keeps an override on top when a new rule set changes the automatic label underneath", async () => {
    const before = await evenings(site.id);
    const target = before.find((e) => e.auto_label === "local") as EveningRow;
    await db("evenings")
      .where({ id: target.id })
      .update({ final_label: "advective", label_source: "override", override_note: "sea breeze seen on the radar", version: target.version + 1 });

    // v2: "still air" so lenient that every covered evening is stagnant
    const lenient: RuleSetInput = {
      ...DEFAULT_RULE_SET,
      thresholds: {
        ...DEFAULT_RULE_SET.thresholds,
        stillUstar: { kind: "absolute", metric: "ustarEvening", op: "below", value: 50 },
        stillWind: { kind: "absolute", metric: "windSpeedEvening", op: "below", value: 500 },
      },
    };
    const v2 = await addRuleSetVersion(groupId, lenient, { name: "Everything still" });
    await setActiveRuleSet(site.id, v2.id);
    const r = await recomputeEvenings(site.id, FROM, TO);
    expect(r.ruleSetVersion).toBe(2);
    expect(r.labelChanged).toBeGreaterThan(0);

    const after = await evenings(site.id);
    const t = after.find((e) => e.id === target.id) as EveningRow;
    expect(t).toMatchObject({
      auto_label: "stagnant",
      final_label: "advective",
      label_source: "override",
      override_note: "sea breeze seen on the radar",
      rule: "still-air",
      rule_set_version: 2,
      version: target.version + 2,
    });
    expect(await eventsOf(target.id)).toEqual([
      { kind: "auto", from_label: null, to_label: "local", rule_set_version: 1 },
      { kind: "auto", from_label: "local", to_label: "stagnant", rule_set_version: 2 },
    ]);
    for (const e of after.filter((x) => x.label_source === "auto")) expect(e.final_label).toBe(e.auto_label);
    for (const e of after.filter((x) => x.auto_label !== "unclassified")) expect(e.auto_label).toBe("stagnant");
    const changed = after.filter((e, i) => e.auto_label !== before[i]?.auto_label);
    expect(changed.length).toBe(r.labelChanged);
    for (const e of changed) expect(e.version).toBeGreaterThan(1);
  });

  it("recomputes every evening of the site when the rule set has site-relative thresholds", async () => {
    const relative: RuleSetInput = {
      ...DEFAULT_RULE_SET,
      thresholds: {
        ...DEFAULT_RULE_SET.thresholds,
        stillUstar: { kind: "percentile", metric: "ustarEvening", op: "below", percentile: 25, fallback: 0.1, minEvenings: 5 },
      },
    };
    const v3 = await addRuleSetVersion(groupId, relative, { name: "Site-relative u*" });
    await setActiveRuleSet(site.id, v3.id);
    const r = await recomputeEvenings(site.id, "2025-06-10", "2025-06-11");
    expect(r.scope).toBe("site");
    expect(r.from! <= FROM).toBe(true);
    expect(r.to! >= TO).toBe(true);
    expect(r.computed).toBeGreaterThan(25);
    const rows = await evenings(site.id);
    expect(rows.filter((e) => e.d >= FROM && e.d <= TO).every((e) => e.rule_set_version === 3)).toBe(true);
  });

  it("marks stored evenings whose data were deleted as unclassified", async () => {
    const v4 = await addRuleSetVersion(groupId, DEFAULT_RULE_SET);
    await setActiveRuleSet(site.id, v4.id);
    await recomputeEvenings(site.id, FROM, TO);
    // a gap inside the data: the classifier itself reports the missing coverage
    const gapFrom = localMidnightUtcMs("2025-06-14", 1);
    await db("half_hours").where({ site_id: site.id }).andWhere("start_utc", ">=", new Date(gapFrom)).andWhere("start_utc", "<", new Date(gapFrom + 86_400_000)).delete();
    // the end of the data removed: no table covers those evenings any more
    const cut = localMidnightUtcMs("2025-06-25", 1);
    await db("half_hours").where({ site_id: site.id }).andWhere("start_utc", ">=", new Date(cut)).delete();
    const r = await recomputeEvenings(site.id, "2025-06-13", TO);
    expect(r.to).toBe(TO);
    const rows = new Map((await evenings(site.id)).map((e) => [e.d, e]));
    const gap = rows.get("2025-06-14") as EveningRow;
    expect(gap.auto_label).toBe("unclassified");
    expect((jsonColumn<string[]>(gap.reasons) ?? []).join(" ")).toMatch(/coverage/);
    for (const d of ["2025-06-25", "2025-06-26", "2025-06-27"]) {
      const e = rows.get(d) as EveningRow;
      expect(e.auto_label).toBe("unclassified");
      expect(jsonColumn(e.reasons)).toEqual([NO_DATA_REASON]);
      expect(e.sigma_w_evening).toBeNull();
    }
    expect(rows.get("2025-06-23")?.auto_label).not.toBe("unclassified");
  });

  it("refuses bad periods and unknown sites", async () => {
    await expect(recomputeEvenings(site.id, "2025-06-10", "2025-06-01")).rejects.toThrow(/after/);
    await expect(recomputeEvenings(site.id, "10/06/2025", "2025-06-11")).rejects.toThrow(/YYYY-MM-DD/);
    await expect(recomputeEvenings(987654321, FROM, TO)).rejects.toThrow(/no site/);
  });
});
