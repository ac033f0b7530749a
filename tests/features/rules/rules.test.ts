import { beforeAll, describe, expect, test } from "vitest";
import { DEFAULT_RULE_SET, type RuleSet } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import { runOnce } from "@/lib/jobs/worker";
import { GET as listRoute, POST as createRoute } from "@/app/api/rule-sets/route";
import { POST as previewRoute } from "@/app/api/rule-sets/preview/route";
import { POST as activateRoute } from "@/app/api/rule-sets/[ruleSetId]/activate/route";
import { rulesJobHandlers } from "@/features/rules/server/jobs";
import type { PreviewResult, RuleSetSummary } from "@/features/rules/schemas";
import { FakeClient } from "@/tests/support/next";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup, type SiteRow } from "@/tests/support/db";
import { towerWithEvenings } from "@/tests/features/rules/tower-data";

// Looser "still air" thresholds: more evenings become stagnant.
function looser(): RuleSet {
  const d = structuredClone(DEFAULT_RULE_SET);
  const u = d.thresholds.stillUstar;
  const w = d.thresholds.stillWind;
  if (u?.kind === "absolute") u.value = 0.3;
  if (w?.kind === "absolute") w.value = 3.5;
  return d;
}

const post = (url: string, body: unknown) =>
  new Request(`http://localhost${url}`, { method: "POST", body: JSON.stringify(body), headers: { "content-type": "application/json" } });

async function snapshot(siteId: number) {
  return db("evenings")
    .where({ site_id: siteId })
    .orderBy("local_date")
    .select("id", "auto_label", "final_label", "label_source", "version", "rule_set_version", "computed_at");
}

describe("rule sets: versions, what-if preview, activation", () => {
  let lead: Awaited<ReturnType<typeof createUserWithGroup>>;
  let analyst: FakeClient;
  let viewer: FakeClient;
  let leadClient: FakeClient;
  let site: SiteRow;
  let overriddenId: number;

  beforeAll(async () => {
    lead = await createUserWithGroup({ role: "lead" });
    const a = await createUser();
    const v = await createUser();
    await addMember(a.id, lead.group.id, "analyst");
    await addMember(v.id, lead.group.id, "viewer");
    leadClient = await clientFor(lead.user);
    analyst = await clientFor(a);
    viewer = await clientFor(v);
    site = await createSiteFor(lead.group.id, { latitude: 47.3, longitude: 9.2, utc_offset_hours: 1 });
    await towerWithEvenings(site, "2021-06-01", 40);
    // an analyst's override that a new rule set must not touch
    const e: { id: number; auto_label: string } = await db("evenings").where({ site_id: site.id }).orderBy("local_date").offset(5).first("id", "auto_label");
    overriddenId = e.id;
    await db("evenings").where({ id: e.id }).update({ final_label: "advective", label_source: "override", override_note: "sea breeze seen on the mast camera" });
  });

  test("what-if preview lists the changes and stores nothing", async () => {
    const before = await snapshot(site.id);
    const ruleSetsBefore = await db("rule_sets").where({ group_id: lead.group.id }).count({ n: "*" }).first();
    const res = await analyst.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-02", to: "2021-07-09", definition: looser() })));
    expect(res.status).toBe(200);
    const p = (await res.json()) as PreviewResult;
    expect(p.evenings).toBe(38);
    expect(p.after.stagnant).toBeGreaterThan(p.before.stagnant);
    expect(p.changes.length).toBeGreaterThan(0);
    expect(p.changes.every((c) => c.after !== c.before)).toBe(true);
    const sum = (c: Record<string, number>) => Object.values(c).reduce((a, b) => a + b, 0);
    expect(sum(p.after)).toBe(38);
    expect(await snapshot(site.id)).toEqual(before);
    expect(await db("rule_sets").where({ group_id: lead.group.id }).count({ n: "*" }).first()).toEqual(ruleSetsBefore);
  });

  test("the unchanged definition previews no change", async () => {
    const res = await analyst.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-02", to: "2021-07-09", definition: DEFAULT_RULE_SET })));
    const p = (await res.json()) as PreviewResult;
    expect(p.changes).toEqual([]);
    expect(p.after).toEqual(p.before);
  });

  test("a bad definition is refused with the path of the problem", async () => {
    const bad = { ...looser(), rules: [{ id: "x", label: "stagnant", description: "", all: ["noSuchThreshold"] }] };
    const res = await analyst.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-02", to: "2021-06-09", definition: bad })));
    expect(res.status).toBe(422);
    expect(JSON.stringify(await res.json())).toMatch(/unknown threshold/);
  });

  test("editing makes a new version with author and comment; activation re-labels in a job and keeps overrides", async () => {
    const badRole = await analyst.call(() => createRoute(post("/api/rule-sets", { groupId: lead.group.id, name: "Looser", comment: "try", definition: looser() })));
    expect(badRole.status).toBe(403);
    const noComment = await leadClient.call(() => createRoute(post("/api/rule-sets", { groupId: lead.group.id, name: "Looser", comment: "", definition: looser() })));
    expect(noComment.status).toBe(422);

    const created = await leadClient.call(() =>
      createRoute(post("/api/rule-sets", { groupId: lead.group.id, name: "Looser still air", comment: "Tower in a hollow: evening u* stays higher", definition: looser() })),
    );
    expect(created.status).toBe(201);
    const { ruleSet } = (await created.json()) as { ruleSet: { id: number; version: number } };
    expect(ruleSet.version).toBe(2);

    const list = await viewer.call(() => listRoute(new Request(`http://localhost/api/rule-sets?groupId=${lead.group.id}`)));
    const { ruleSets } = (await list.json()) as { ruleSets: RuleSetSummary[] };
    expect(ruleSets.map((r) => r.version)).toEqual([2, 1]);
    expect(ruleSets[0]?.comment).toBe("Tower in a hollow: evening u* stays higher");
    expect(ruleSets[0]?.author).toBe(lead.user.displayName);
    expect(ruleSets[1]?.eveningsLabelled).toBeGreaterThan(0);

    const preview = (await (
      await analyst.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-01", to: "2021-07-10", definition: looser() })))
    ).json()) as PreviewResult;

    const ctx = { params: Promise.resolve({ ruleSetId: String(ruleSet.id) }) };
    expect((await analyst.call(() => activateRoute(post("/x", { siteId: site.id }), ctx))).status).toBe(403);
    const activated = await leadClient.call(() => activateRoute(post("/x", { siteId: site.id }), ctx));
    expect(activated.status).toBe(202);
    const { jobId } = (await activated.json()) as { jobId: number };
    expect((await db("sites").where({ id: site.id }).first("active_rule_set_id")) as unknown).toEqual({ active_rule_set_id: ruleSet.id });

    const outcome = await runOnce({ handlers: rulesJobHandlers, progressMs: 0, jobIds: [jobId] });
    expect(outcome).toMatchObject({ jobId, status: "done" });
    const job = (await db("jobs").where({ id: jobId }).first()) as { status: string; progress_done: number; progress_total: number; progress_unit: string };
    expect(job.status).toBe("done");
    expect(Number(job.progress_total)).toBeGreaterThan(0);
    expect(Number(job.progress_done)).toBe(Number(job.progress_total));
    expect(job.progress_unit).toBe("evenings");

    const after: Array<{ id: number; d: string; auto_label: string; final_label: string; label_source: string; rule_set_version: number }> = await db("evenings")
      .where({ site_id: site.id })
      .select("id", db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS d"), "auto_label", "final_label", "label_source", "rule_set_version");
    expect(after.every((e) => e.rule_set_version === 2)).toBe(true);
    // the stored labels are what the preview said they would be
    const counts = { local: 0, stagnant: 0, advective: 0, unclassified: 0 } as Record<string, number>;
    for (const e of after) if (e.d >= "2021-06-01" && e.d <= "2021-07-10") counts[e.auto_label] = (counts[e.auto_label] ?? 0) + 1;
    expect(counts).toEqual(preview.after);
    const kept = after.find((e) => e.id === overriddenId);
    expect(kept).toMatchObject({ final_label: "advective", label_source: "override" });
    for (const e of after) if (e.label_source === "auto") expect(e.final_label).toBe(e.auto_label);
    const events = await db("evening_events").where({ kind: "auto", rule_set_version: 2 }).whereIn("evening_id", after.map((e) => e.id)).count({ n: "*" }).first();
    expect(Number((events as { n: number }).n)).toBe(preview.changes.length);
  });

  test("roles: viewer cannot edit (403) nor preview (403), another group 404, anonymous 401", async () => {
    expect((await viewer.call(() => createRoute(post("/api/rule-sets", { groupId: lead.group.id, name: "x", comment: "nope nope", definition: looser() })))).status).toBe(403);
    expect((await viewer.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-02", to: "2021-06-09", definition: looser() })))).status).toBe(403);
    const stranger = await clientFor((await createUserWithGroup()).user);
    expect((await stranger.call(() => createRoute(post("/api/rule-sets", { groupId: lead.group.id, name: "x", comment: "nope nope", definition: looser() })))).status).toBe(404);
    expect((await stranger.call(() => previewRoute(post("/api/rule-sets/preview", { siteId: site.id, from: "2021-06-02", to: "2021-06-09", definition: looser() })))).status).toBe(404);
    expect((await new FakeClient().call(() => listRoute(new Request(`http://localhost/api/rule-sets?groupId=${lead.group.id}`))))).toHaveProperty("status", 401);
  });
});
