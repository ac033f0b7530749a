import { describe, expect, test } from "vitest";
import { ZodError } from "zod";
import { classifyTable } from "@/lib/classify/evenings";
import { DEFAULT_RULE_SET, parseRuleSet, type RuleSetInput } from "@/lib/classify/rules";
import type { SiteParams } from "@/lib/classify/site";
import { generateSynthetic } from "@/lib/synthetic/generator";

const SITE: SiteParams = { latitudeDeg: 45, longitudeDeg: 5, elevationM: 200, measurementHeightM: 12, canopyHeightM: 1, utcOffsetHours: 1 };

function clone(): RuleSetInput {
  return JSON.parse(JSON.stringify(DEFAULT_RULE_SET)) as RuleSetInput;
}

describe("rule set schema", () => {
  test("the default rule set is versioned JSON that round-trips through the schema", () => {
    expect(DEFAULT_RULE_SET.version).toBe(1);
    expect(parseRuleSet(JSON.parse(JSON.stringify(DEFAULT_RULE_SET)))).toEqual(DEFAULT_RULE_SET);
    expect(DEFAULT_RULE_SET.windows.afternoon).toEqual({ startMinutes: -180, endMinutes: -60 });
    expect(DEFAULT_RULE_SET.rules.map((r) => r.id)).toEqual(["still-air", "wind-turned", "shear-kept-mixing", "surface-cooling"]);
  });

  test.each([
    ["an unknown threshold in a rule", (r: RuleSetInput) => r.rules[0]?.all.push("noSuchThing"), /unknown threshold "noSuchThing"/],
    ["a duplicate rule id", (r: RuleSetInput) => r.rules.push({ ...(r.rules[0] as RuleSetInput["rules"][number]) }), /duplicate rule id still-air/],
    ["a window ending before it starts", (r: RuleSetInput) => (r.windows.evening.endMinutes = 0), /endMinutes must be after startMinutes/],
    ["coverage above 1", (r: RuleSetInput) => (r.minCoverage.evening = 2), /minCoverage/],
  ])("rejects %s with a readable issue", (_d, mutate, message) => {
    const bad = clone();
    mutate(bad);
    try {
      parseRuleSet(bad);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ZodError);
      const text = (e as ZodError).issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("\n");
      expect(text).toMatch(message);
    }
  });
});

describe("site-relative thresholds", () => {
  const g = generateSynthetic({ site: SITE, startDate: "2021-01-01", days: 200, seed: 21 });

  test("a percentile threshold resolves over the site's own evenings", () => {
    const rs = clone();
    rs.thresholds.stillUstar = { kind: "percentile", metric: "ustarEvening", op: "below", percentile: 10, fallback: 0.1, minEvenings: 30 };
    const rules = parseRuleSet(rs);
    const r = classifyTable(g.table, SITE, rules);
    const ustars = r.flatMap((e) => (e.metrics.ustarEvening === null ? [] : [e.metrics.ustarEvening])).sort((a, b) => a - b);
    const stagnant = r.filter((e) => e.label === "stagnant");
    // at most about a tenth of evenings can pass a 10th-percentile u* test
    expect(stagnant.length).toBeLessThanOrEqual(Math.ceil(0.1 * ustars.length) + 1);
    expect(stagnant.length).toBeGreaterThan(0);
    for (const e of stagnant) expect(e.margins.stillUstar).toBeGreaterThan(0);
  });

  test("too few evenings: the fallback is used and the reasons say so", () => {
    const rs = clone();
    rs.thresholds.stillUstar = { kind: "percentile", metric: "ustarEvening", op: "below", percentile: 20, fallback: 0.1, minEvenings: 500 };
    const r = classifyTable(g.table, SITE, parseRuleSet(rs));
    expect(r[5]?.reasons.join(" ")).toMatch(/stillUstar: only \d+ evenings with ustarEvening \(< 500\); fallback 0\.1 used/);
    const rDefault = classifyTable(g.table, SITE);
    expect(r.map((e) => e.label)).toEqual(rDefault.map((e) => e.label));
  });

  test("configurable windows and rule order change the outcome", () => {
    const rs = clone();
    rs.rules = [rs.rules[3] as RuleSetInput["rules"][number], ...rs.rules.slice(0, 3)];
    const r = classifyTable(g.table, SITE, parseRuleSet(rs));
    // with the local rule first, stagnant evenings (also decayed and stable) are taken as local
    expect(r.filter((e) => e.label === "stagnant").length).toBeLessThan(
      classifyTable(g.table, SITE).filter((e) => e.label === "stagnant").length,
    );
  });
});
