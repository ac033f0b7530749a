import { describe, expect, test } from "vitest";
import { GET as queueGET } from "@/app/api/sites/[siteId]/evenings/queue/route";
import { GET as anomaliesGET } from "@/app/api/sites/[siteId]/anomalies/route";
import { db } from "@/lib/db/knex";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";
import type { QueueItem } from "@/features/review/schemas";
import { insertEvenings } from "@/tests/features/review/fixtures";

/*
 * Anomalies and weak-turbulence nights, stored as the anomaly job stores them, feed the review
 * queue through GET /api/sites/:id/evenings/queue and the calendar markers through
 * GET /api/sites/:id/anomalies?include=weak-turbulence. All rows are synthetic.
 */

const BASE = "http://localhost:3000";
const get = (path: string) => new Request(`${BASE}${path}`);
const site = (id: number) => ({ params: Promise.resolve({ siteId: String(id) }) });

async function scene() {
  const { group } = await createUserWithGroup({ role: "lead" });
  const s = await createSiteFor(group.id);
  // Same margins everywhere, so only the flags tell the evenings apart.
  const ids = (await insertEvenings(s.id, [
    { date: "2025-07-01", autoLabel: "local" },
    { date: "2025-07-02", autoLabel: "stagnant" },
    { date: "2025-07-03", autoLabel: "local" },
    { date: "2025-07-04", autoLabel: "advective" },
  ])) as [number, number, number, number];
  const anomaly = (eveningId: number, series: string, kind: "rise-after-sunset" | "spike", hour: number) => ({
    site_id: s.id,
    evening_id: eveningId,
    series,
    kind,
    start_utc: new Date(`2025-07-0${ids.indexOf(eveningId) + 1}T${hour}:00:00Z`),
    end_utc: new Date(`2025-07-0${ids.indexOf(eveningId) + 1}T${hour + 1}:00:00Z`),
    peak_score: 7.5,
    periods: 3,
    label_at_detection: "stagnant" as const,
  });
  await db("anomalies").insert([
    anomaly(ids[1], "CO2", "rise-after-sunset", 20),
    anomaly(ids[1], "ISOPRENE", "rise-after-sunset", 21),
  ]);
  await db("weak_turbulence").insert([
    { evening_id: ids[3], site_id: s.id, flux_series: "FC", threshold_ms: 0.22, night_periods: 18, weak_periods: 6 },
    // a computed night without weak periods is no flag
    { evening_id: ids[0], site_id: s.id, flux_series: "FC", threshold_ms: 0.22, night_periods: 18, weak_periods: 0 },
  ]);
  const viewer = await createUser();
  await addMember(viewer.id, group.id, "viewer");
  return { site: s, ids, client: await clientFor(viewer, { groupId: group.id }) };
}

describe("anomalies and weak turbulence in the review", () => {
  test("the queue ranks flagged evenings first and says why", async () => {
    const { site: s, ids, client } = await scene();
    const res = await client.call(() =>
      queueGET(get(`/api/sites/${s.id}/evenings/queue?from=2025-07-01&to=2025-07-31`), site(s.id)),
    );
    expect(res.status).toBe(200);
    const { queue } = (await res.json()) as { queue: QueueItem[] };
    expect(queue.map((q) => q.id)).toEqual([ids[1], ids[3], ids[0], ids[2]]);
    expect(queue[0]?.why).toMatch(/^2 anomalies: CO2 rise after sunset, ISOPRENE rise after sunset; /);
    expect(queue[0]).toMatchObject({ anomalyCount: 2, weakTurbulence: false });
    expect(queue[1]?.why).toMatch(/^weak turbulence: 6 of 18 night half-hours of FC under u\* 0\.22 m\/s; /);
    expect(queue[1]).toMatchObject({ anomalyCount: 0, weakTurbulence: true });
    expect(queue[2]?.why).not.toMatch(/anomal|weak/);
  });

  test("a period without the flagged evenings carries no flags", async () => {
    const { site: s, ids, client } = await scene();
    const res = await client.call(() =>
      queueGET(get(`/api/sites/${s.id}/evenings/queue?from=2025-07-03&to=2025-07-03`), site(s.id)),
    );
    const { queue } = (await res.json()) as { queue: QueueItem[] };
    expect(queue.map((q) => [q.id, q.anomalyCount, q.weakTurbulence])).toEqual([[ids[2], 0, false]]);
  });

  test("the anomalies endpoint adds the weak-turbulence nights only when asked (calendar markers)", async () => {
    const { site: s, client } = await scene();
    const url = `/api/sites/${s.id}/anomalies?from=2025-07-01&to=2025-07-31`;
    const plain = (await (await client.call(() => anomaliesGET(get(url), site(s.id)))).json()) as Record<string, unknown>;
    expect(Object.keys(plain)).toEqual(["anomalies"]);
    const res = await client.call(() => anomaliesGET(get(`${url}&include=weak-turbulence`), site(s.id)));
    expect(res.status).toBe(200);
    const body = (await res.json()) as { anomalies: Array<{ eveningDate: string; series: string }>; weakTurbulence: unknown };
    expect(body.anomalies.map((a) => [a.eveningDate, a.series])).toEqual([
      ["2025-07-02", "CO2"],
      ["2025-07-02", "ISOPRENE"],
    ]);
    expect(body.weakTurbulence).toEqual([
      {
        eveningDate: "2025-07-04",
        label: "advective",
        fluxSeries: "FC",
        thresholdMs: 0.22,
        weakPeriods: 6,
        nightPeriods: 18,
      },
    ]);
  });
});
