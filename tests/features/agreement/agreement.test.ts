import { beforeAll, describe, expect, test } from "vitest";
import { cohensKappa } from "@/lib/stats/kappa";
import type { LabelKey } from "@/lib/ui/label-badge";
import { agreementReport, cellEvenings } from "@/features/agreement/server/queries";
import { AuthError } from "@/lib/auth/session";
import { createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";
import { datesBetween, insertEvenings, type EveningSeed } from "@/tests/features/seasons/evening-rows";

describe("agreement between automatic and final labels", () => {
  let owner: Awaited<ReturnType<typeof createUserWithGroup>>;
  let siteId: number;
  // Wikipedia "Cohen's kappa" worked example (from memory): 20 agree yes, 15 agree no, 5 and 10
  // disagree; kappa 0.4. Here "yes" is stagnant and "no" local: the same table in labels.
  const plan: Array<[LabelKey, LabelKey, number]> = [
    ["stagnant", "stagnant", 20],
    ["stagnant", "local", 5],
    ["local", "stagnant", 10],
    ["local", "local", 15],
  ];

  beforeAll(async () => {
    owner = await createUserWithGroup({ role: "viewer" });
    siteId = (await createSiteFor(owner.group.id)).id;
    const dates = datesBetween("2022-01-01", "2022-02-19");
    const seeds: EveningSeed[] = [];
    let i = 0;
    for (const [auto, final, n] of plan) {
      for (let k = 0; k < n; k++) {
        const date = dates[i++] ?? "";
        seeds.push({ date, auto, final: auto === final ? undefined : final, note: auto === final ? undefined : "analyst disagrees" });
      }
    }
    await insertEvenings(siteId, seeds);
  });

  test("confusion table, overall agreement and kappa", async () => {
    const r = await agreementReport(owner.user, siteId);
    const at = (a: LabelKey, f: LabelKey) => r.counts[r.labels.indexOf(a)]?.[r.labels.indexOf(f)];
    expect(at("stagnant", "stagnant")).toBe(20);
    expect(at("stagnant", "local")).toBe(5);
    expect(at("local", "stagnant")).toBe(10);
    expect(at("local", "local")).toBe(15);
    expect(r.n).toBe(50);
    expect(r.overrides).toBe(15);
    expect(r.observed).toBeCloseTo(0.7, 12);
    expect(r.kappa).toBeCloseTo(0.4, 12);
    expect(r.kappa).toBeCloseTo(cohensKappa(r.counts).kappa ?? NaN, 12);
  });

  test("the period narrows the table; the evenings behind a cell are listed", async () => {
    const r = await agreementReport(owner.user, siteId, { from: "2022-01-01", to: "2022-01-20" });
    expect(r.n).toBe(20);
    const cell = await cellEvenings(owner.user, siteId, "stagnant", "local");
    expect(cell.map((c) => c.date)).toEqual(datesBetween("2022-01-21", "2022-01-25"));
    expect(cell.every((c) => c.source === "override" && c.note === "analyst disagrees")).toBe(true);
  });

  test("a person outside the group finds nothing", async () => {
    await expect(agreementReport(await createUser(), siteId)).rejects.toBeInstanceOf(AuthError);
  });
});
