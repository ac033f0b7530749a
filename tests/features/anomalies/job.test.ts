import { beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { runOnce } from "@/lib/jobs/worker";
import { getJob } from "@/lib/jobs/queue";
import { enqueueAnomalyDetection } from "@/lib/anomalies/server/enqueue";
import {
  anomaliesForEvening,
  anomalyCountsByLabel,
  anomalyDatesForSite,
  listAnomalies,
  ustarThresholdsForSite,
  weakTurbulenceForSite,
} from "@/lib/anomalies/server/queries";
import { anomalyJobHandlers } from "@/features/anomalies/server/jobs";
import { createUserWithGroup } from "@/tests/support/db";
import { KNOWN_USTAR_THRESHOLD, seedSyntheticSite } from "@/tests/features/anomalies/seed";

const INJECTED = ["2023-02-14", "2023-04-03", "2023-05-27", "2023-07-19", "2023-09-08", "2023-11-21"];

describe("the anomalies job on a SYNTHETIC site with known truth", () => {
  let siteId = 0;
  let truth: Array<{ date: string; kind: string }> = [];

  beforeAll(async () => {
    const { group } = await createUserWithGroup({ role: "lead" });
    const seeded = await seedSyntheticSite(group.id, {
      startDate: "2022-12-01",
      days: 365,
      injected: INJECTED,
    });
    siteId = seeded.site.id;
    truth = seeded.truth;
    const jobId = await enqueueAnomalyDetection(siteId, null, null);
    // a second request while the first is queued widens it instead of queueing another
    expect(await enqueueAnomalyDetection(siteId, "2023-01-01", "2023-02-01")).toBe(jobId);
    await runOnce({ handlers: anomalyJobHandlers, jobIds: [jobId] });
    const job = await getJob(jobId);
    expect(job?.status, job?.message ?? "").toBe("done");
  }, 120_000);

  test("finds the injected post-sunset rises, each with its evening's label", async () => {
    const { anomalies } = await listAnomalies(
      siteId,
      { series: "ISOPRENE", kind: "rise-after-sunset" },
      { limit: 1000 },
    );
    const dates = new Set(anomalies.map((a) => a.eveningDate));
    for (const d of INJECTED) expect(dates.has(d), d).toBe(true);
    for (const a of anomalies) expect(a.label).toBe(truth.find((t) => t.date === a.eveningDate)?.kind);
    const markers = await anomalyDatesForSite(siteId, "2023-04-01", "2023-04-30");
    expect(markers.find((m) => m.date === "2023-04-03")?.kinds).toContain("rise-after-sunset");
  });

  test("stores the u* thresholds per season with bootstrap spread, near the known threshold", async () => {
    const rows = await ustarThresholdsForSite(siteId);
    const year = rows.find((r) => r.seasonYear === 2023 && r.season === "year");
    expect(Math.abs((year?.thresholdMs ?? 0) - KNOWN_USTAR_THRESHOLD)).toBeLessThan(0.05);
    const seasons = rows.filter((r) => r.seasonYear === 2023 && r.season !== "year").map((r) => r.season);
    expect(seasons).toEqual(["winter", "spring", "summer", "autumn"]);
    for (const r of rows.filter((x) => x.seasonYear === 2023)) {
      expect(r.bootstrap.resamples).toBe(100);
      expect(r.bootstrap.p05 ?? 0).toBeLessThanOrEqual(r.bootstrap.p95 ?? 0);
    }
  });

  test("flags weak turbulence on the nights of still evenings", async () => {
    const weak = await weakTurbulenceForSite(siteId, {}, { limit: 1000 });
    const stagnant = weak.byLabel.find((b) => b.label === "stagnant");
    const stagnantEvenings = truth.filter((t) => t.kind === "stagnant").length;
    // the generator keeps u* below 0.07 m/s after stagnant sunsets: nearly all of them are flagged
    expect(stagnant?.evenings ?? 0).toBeGreaterThan(0.9 * stagnantEvenings);
    const advective = weak.byLabel.find((b) => b.label === "advective");
    expect((advective?.weakPeriods ?? 0) / Math.max(1, advective?.nightPeriods ?? 1)).toBeLessThan(
      (stagnant?.weakPeriods ?? 0) / Math.max(1, stagnant?.nightPeriods ?? 1),
    );
  });

  test("flags survive reclassification: an anomaly shows its evening's new label", async () => {
    const date = INJECTED[1] as string;
    const ev = await db("evenings")
      .where({ site_id: siteId, local_date: date })
      .first<{ id: number; final_label: string }>("id", "final_label");
    if (!ev) throw new Error("no evening");
    const newLabel = ev.final_label === "stagnant" ? "advective" : "stagnant";
    const before = await anomalyCountsByLabel(siteId, {
      series: "ISOPRENE",
      kind: "rise-after-sunset",
      label: newLabel,
    });
    await db("evenings")
      .where({ id: ev.id })
      .update({ final_label: newLabel, label_source: "override", version: db.raw("version + 1") });
    const shown = await anomaliesForEvening(ev.id);
    expect(shown.length).toBeGreaterThan(0);
    for (const a of shown) expect(a.label).toBe(newLabel);
    expect(shown[0]?.labelSource).toBe("override");
    expect(shown[0]?.labelAtDetection).toBe(ev.final_label);
    const after = await anomalyCountsByLabel(siteId, {
      series: "ISOPRENE",
      kind: "rise-after-sunset",
      label: newLabel,
    });
    expect((after[0]?.count ?? 0) - (before[0]?.count ?? 0)).toBe(1);
  });

  test("re-running replaces rather than duplicates", async () => {
    const before = (await listAnomalies(siteId)).total;
    const id = await enqueueAnomalyDetection(siteId, "2023-03-01", "2023-06-30");
    await runOnce({ handlers: anomalyJobHandlers, jobIds: [id] });
    expect((await getJob(id))?.status).toBe("done");
    expect((await listAnomalies(siteId)).total).toBe(before);
  });

  test("filters by season and label", async () => {
    const summer = await listAnomalies(siteId, { season: "summer" }, { limit: 1000 });
    for (const a of summer.anomalies) expect(["06", "07", "08"]).toContain(a.eveningDate.slice(5, 7));
    const local = await listAnomalies(siteId, { label: "local" }, { limit: 1000 });
    for (const a of local.anomalies) expect(a.label).toBe("local");
  });
});
