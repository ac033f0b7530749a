import { beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { GET } from "@/app/api/sites/[siteId]/anomalies/route";
import { FakeClient } from "@/tests/support/next";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";

const call = (client: FakeClient, siteId: number | string, query = "") =>
  client.call(() =>
    GET(new Request(`http://localhost/api/sites/${siteId}/anomalies${query}`), {
      params: Promise.resolve({ siteId: String(siteId) }),
    }),
  );

describe("GET /api/sites/:siteId/anomalies", () => {
  let siteId = 0;
  let groupId = 0;

  beforeAll(async () => {
    const { group } = await createUserWithGroup({ role: "lead" });
    groupId = group.id;
    siteId = (await createSiteFor(group.id)).id;
    const [eveningId] = await db("evenings").insert({
      site_id: siteId,
      local_date: "2023-06-10",
      sunset_utc: new Date("2023-06-10T19:25:00Z"),
      auto_label: "stagnant",
      final_label: "stagnant",
      reasons: "[]",
      margins: "{}",
      metrics: "{}",
    });
    if (eveningId === undefined) throw new Error("the evening insert returned no id");
    await db("anomalies").insert({
      site_id: siteId,
      evening_id: eveningId,
      series: "O3",
      kind: "rise-after-sunset",
      start_utc: new Date("2023-06-10T20:00:00Z"),
      end_utc: new Date("2023-06-10T21:30:00Z"),
      peak_score: 9.5,
      periods: 3,
      label_at_detection: "stagnant",
    });
  });

  test("anonymous callers get 401", async () => {
    const res = await call(new FakeClient(), siteId);
    expect(res.status).toBe(401);
  });

  test("members of another group get 404", async () => {
    const { user } = await createUserWithGroup({ role: "lead" });
    const res = await call(await clientFor(user), siteId);
    expect(res.status).toBe(404);
  });

  test("a viewer reads the anomalies with their evening's label", async () => {
    const viewer = await createUser();
    await addMember(viewer.id, groupId, "viewer");
    const client = await clientFor(viewer);
    const res = await call(client, siteId, "?from=2023-06-01&to=2023-06-30");
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({
      anomalies: [
        {
          series: "O3",
          kind: "rise-after-sunset",
          start: "2023-06-10T20:00:00.000Z",
          end: "2023-06-10T21:30:00.000Z",
          peakScore: 9.5,
          eveningDate: "2023-06-10",
          label: "stagnant",
        },
      ],
    });
    const outside = await call(client, siteId, "?from=2023-07-01");
    expect(await outside.json()).toEqual({ anomalies: [] });
  });

  test("bad dates are 422 and unknown sites 404", async () => {
    const viewer = await createUser();
    await addMember(viewer.id, groupId, "viewer");
    const client = await clientFor(viewer);
    expect((await call(client, siteId, "?from=June")).status).toBe(422);
    expect((await call(client, siteId, "?from=2023-07-01&to=2023-06-01")).status).toBe(422);
    expect((await call(client, "999999999")).status).toBe(404);
    expect((await call(client, "abc")).status).toBe(404);
  });
});

test("a script reads with an API token of a member", async () => {
  const { createApiToken } = await import("@/lib/auth/tokens");
  const { user, group } = await createUserWithGroup({ role: "viewer" });
  const site = await createSiteFor(group.id);
  const { secret } = await createApiToken(user.id, "script");
  const res = await new FakeClient().call(() =>
    GET(
      new Request(`http://localhost/api/sites/${site.id}/anomalies`, {
        headers: { authorization: `Bearer ${secret}` },
      }),
      { params: Promise.resolve({ siteId: String(site.id) }) },
    ),
  );
  expect(res.status).toBe(200);
  expect(await res.json()).toEqual({ anomalies: [] });
  const bad = await new FakeClient().call(() =>
    GET(
      new Request(`http://localhost/api/sites/${site.id}/anomalies`, {
        headers: { authorization: "Bearer nope" },
      }),
      {
        params: Promise.resolve({ siteId: String(site.id) }),
      },
    ),
  );
  expect(bad.status).toBe(401);
});
