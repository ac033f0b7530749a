/*
 * The calendar endpoint serves bodies from an in-process cache checked against the evenings'
 * change stamp on every request: these tests change evenings in every way the product does and
 * expect the very next answer to show it. Evenings are synthetic fixtures.
 */
import { describe, expect, test } from "vitest";
import { GET as listGET } from "@/app/api/sites/[siteId]/evenings/route";
import { POST as overridePOST } from "@/app/api/evenings/[eveningId]/overrides/route";
import { POST as revertPOST } from "@/app/api/evenings/[eveningId]/revert/route";
import { POST as reviewedPOST } from "@/app/api/evenings/[eveningId]/reviewed/route";
import { DEFAULT_RULE_SET, type RuleSetInput } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import { recomputeEvenings } from "@/lib/evenings/recompute";
import { addRuleSetVersion, setActiveRuleSet } from "@/lib/evenings/rulesets";
import { generateSynthetic, type EveningKind } from "@/lib/synthetic/generator";
import type { EveningSummary } from "@/features/review/schemas";
import { clientFor, createSiteFor, createUserWithGroup } from "@/tests/support/db";
import type { FakeClient } from "@/tests/support/next";
import { insertEvenings, SAMPLE_METRICS } from "@/tests/features/review/fixtures";
import { paramsOf, storeTable } from "@/tests/lib/evenings/helpers";

const BASE = "http://localhost:3000";
const post = (path: string, body: unknown) =>
  new Request(`${BASE}${path}`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
const eve = (id: number) => ({ params: Promise.resolve({ eveningId: String(id) }) });

async function list(c: FakeClient, siteId: number, from: string, to: string, etag?: string) {
  const req = new Request(`${BASE}/api/sites/${siteId}/evenings?from=${from}&to=${to}`, {
    headers: etag ? { "if-none-match": etag } : {},
  });
  const res = await c.call(() => listGET(req, { params: Promise.resolve({ siteId: String(siteId) }) }));
  const text = await res.text();
  return {
    status: res.status,
    etag: res.headers.get("etag"),
    cacheControl: res.headers.get("cache-control"),
    text,
    evenings: text ? ((JSON.parse(text) as { evenings: EveningSummary[] }).evenings) : [],
  };
}

async function scene() {
  const { user: lead, group } = await createUserWithGroup({ role: "lead" });
  const site = await createSiteFor(group.id);
  const ids = await insertEvenings(site.id, [
    { date: "2025-07-01", autoLabel: "local" },
    { date: "2025-07-02", autoLabel: "stagnant", rule: "still-air" },
    { date: "2025-07-03", autoLabel: "advective", rule: "moving-air" },
  ]);
  return { site, ids: ids as [number, number, number], lead: await clientFor(lead, { groupId: group.id }) };
}

describe("calendar answers and their change stamp", () => {
  test("a repeated request gets the same ETag; If-None-Match with it answers 304 without a body", async () => {
    const { site, lead } = await scene();
    const a = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(a.status).toBe(200);
    expect(a.etag).toMatch(/^".+"$/);
    expect(a.cacheControl).toBe("private, no-cache, no-transform");
    const b = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(b.etag).toBe(a.etag);
    expect(b.text).toBe(a.text);
    const c = await list(lead, site.id, "2025-07-01", "2025-07-31", a.etag!);
    expect(c.status).toBe(304);
    expect(c.text).toBe("");
    expect(c.etag).toBe(a.etag);
    // another period of the same site is its own entry
    const d = await list(lead, site.id, "2025-07-02", "2025-07-31");
    expect(d.evenings.map((e) => e.date)).toEqual(["2025-07-02", "2025-07-03"]);
  });

  test("override, revert and reviewed are visible to the very next request, with a new ETag", async () => {
    const { site, ids, lead } = await scene();
    const first = await list(lead, site.id, "2025-07-01", "2025-07-31");
    const o = await lead.call(() =>
      overridePOST(post(`/api/evenings/${ids[0]}/overrides`, { label: "advective", note: "front in TA and WD", version: 1 }), eve(ids[0])),
    );
    expect(o.status).toBe(200);
    const afterOverride = await list(lead, site.id, "2025-07-01", "2025-07-31", first.etag!);
    expect(afterOverride.status).toBe(200);
    expect(afterOverride.etag).not.toBe(first.etag);
    expect(afterOverride.evenings[0]).toMatchObject({ label: "advective", source: "override", reviewed: true, version: 2 });

    const r = await lead.call(() => revertPOST(post(`/api/evenings/${ids[0]}/revert`, { version: 2 }), eve(ids[0])));
    expect(r.status).toBe(200);
    const afterRevert = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(afterRevert.evenings[0]).toMatchObject({ label: "local", source: "auto", version: 3 });

    const m = await lead.call(() => reviewedPOST(post(`/api/evenings/${ids[1]}/reviewed`, { version: 1 }), eve(ids[1])));
    expect(m.status).toBe(200);
    const afterReviewed = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(afterReviewed.evenings[1]).toMatchObject({ reviewed: true, version: 2 });
    expect(new Set([first.etag, afterOverride.etag, afterRevert.etag, afterReviewed.etag]).size).toBe(4);
  });

  test("a new evening in the period, and a changed row that bumps its version, show at once", async () => {
    const { site, ids, lead } = await scene();
    await list(lead, site.id, "2025-07-01", "2025-07-31");
    await insertEvenings(site.id, [{ date: "2025-07-04", autoLabel: "unclassified" }]);
    const withNew = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(withNew.evenings.map((e) => e.date)).toEqual(["2025-07-01", "2025-07-02", "2025-07-03", "2025-07-04"]);
    // every writer bumps version with a change (the stamp's invariant, lib/evenings/stamp.ts)
    await db("evenings").where({ id: ids[2] }).update({ final_label: "stagnant", label_source: "override", version: 2 });
    const changed = await list(lead, site.id, "2025-07-01", "2025-07-31");
    expect(changed.evenings[2]).toMatchObject({ label: "stagnant", source: "override", version: 2 });
  });

  test("metrics go out with four significant digits", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const site = await createSiteFor(group.id);
    await insertEvenings(site.id, [
      { date: "2025-08-01", metrics: { ...SAMPLE_METRICS, sigmaWDecay: 0.058738929679812285, hZeroCrossingMinutes: -42.22346492919922 } },
    ]);
    const c = await clientFor(user, { groupId: group.id });
    const { evenings } = await list(c, site.id, "2025-08-01", "2025-08-01");
    expect(evenings[0]?.metrics).toMatchObject({ sigmaWDecay: 0.05874, hZeroCrossingMinutes: -42.22, sigmaWAfternoon: 0.6 });
  });

  test("a recompute with a new rule set is visible at once; answers during concurrent changes end current", async () => {
    const { user, group } = await createUserWithGroup({ role: "lead" });
    const site = await createSiteFor(group.id, { latitude: 47.1, longitude: 8.4, utc_offset_hours: 1, canopy_height_m: 18, measurement_height_m: 32 });
    // SYNTHETIC data (lib/synthetic), forced kinds so that every label appears
    const kinds: Record<string, EveningKind> = {};
    for (let d = 0; d < 12; d++) {
      kinds[`2025-06-${String(d + 1).padStart(2, "0")}`] = (["local", "stagnant", "advective"] as const)[d % 3] as EveningKind;
    }
    const table = generateSynthetic({ site: paramsOf(site), startDate: "2025-06-01", days: 12, seed: 77, kinds }).table;
    await storeTable(site.id, table);
    await recomputeEvenings(site.id, "2025-06-02", "2025-06-10");
    const c = await clientFor(user, { groupId: group.id });
    const before = await list(c, site.id, "2025-06-01", "2025-06-30");
    expect(before.evenings).toHaveLength(9);
    expect(before.evenings.some((e) => e.label !== "stagnant")).toBe(true);

    // "still air" so lenient that every covered evening is stagnant
    const lenient: RuleSetInput = {
      ...DEFAULT_RULE_SET,
      thresholds: {
        ...DEFAULT_RULE_SET.thresholds,
        stillUstar: { kind: "absolute", metric: "ustarEvening", op: "below", value: 50 },
        stillWind: { kind: "absolute", metric: "windSpeedEvening", op: "below", value: 500 },
      },
    };
    const v2 = await addRuleSetVersion(group.id, lenient);
    await setActiveRuleSet(site.id, v2.id);
    const [, ...during] = await Promise.all([
      recomputeEvenings(site.id, "2025-06-02", "2025-06-10"),
      list(c, site.id, "2025-06-01", "2025-06-30"),
      list(c, site.id, "2025-06-01", "2025-06-30"),
    ]);
    for (const d of during) expect(d.status).toBe(200);
    const after = await list(c, site.id, "2025-06-01", "2025-06-30");
    const stored = await db("evenings").where({ site_id: site.id }).orderBy("local_date").select("final_label", "version");
    expect(after.evenings.map((e) => [e.label, e.version])).toEqual(stored.map((r) => [r.final_label, r.version]));
    expect(after.evenings.map((e) => e.label)).not.toEqual(before.evenings.map((e) => e.label));
    expect(after.etag).not.toBe(before.etag);
  });
});
