/*
 * Role checks and errors of the import routes: POST /api/sites/:id/imports, GET history,
 * GET /api/jobs/:id. Data is SYNTHETIC.
 */
import { describe, expect, test } from "vitest";
import { GET as jobGET } from "@/app/api/jobs/[jobId]/route";
import { GET as listGET, POST } from "@/app/api/sites/[siteId]/imports/route";
import { createApiToken, revokeApiToken } from "@/lib/auth/tokens";
import { db } from "@/lib/db/knex";
import { receiveUpload } from "@/features/imports/server/upload";
import { addMember, clientFor, createUserWithGroup } from "@/tests/support/db";
import { FakeClient } from "@/tests/support/next";
import { BASE, analystWithSite, halfHourCount, syntheticCsv, upload, uploadRequest } from "@/tests/features/imports/helpers";

const SMALL = syntheticCsv(1);
const ctx = (siteId: number) => ({ params: Promise.resolve({ siteId: String(siteId) }) });

describe("POST /api/sites/:siteId/imports", () => {
  test("anonymous: 401, nothing stored", async () => {
    const { site } = await analystWithSite();
    const res = await new FakeClient().call(() => POST(uploadRequest(site.id, SMALL), ctx(site.id)));
    expect(res.status).toBe(401);
    expect(await db("imports").where({ site_id: site.id }).first()).toBeUndefined();
  });

  test("a viewer: 403; another group's member: 404", async () => {
    const { site, groupId } = await analystWithSite();
    const viewer = await createUserWithGroup({ role: "viewer" });
    await addMember(viewer.user.id, groupId, "viewer");
    const v = await upload(await clientFor(viewer.user, { groupId }), site.id, SMALL);
    expect(v.res.status).toBe(403);
    const stranger = await createUserWithGroup({ role: "lead" });
    const s = await upload(await clientFor(stranger.user), site.id, SMALL);
    expect(s.res.status).toBe(404);
    expect(s.body.error?.code).toBe("not_found");
    expect(await db("imports").where({ site_id: site.id }).first()).toBeUndefined();
  });

  test("an unknown or malformed site id: 404", async () => {
    const { client } = await analystWithSite();
    const res = await client.call(() => POST(uploadRequest(1, SMALL), { params: Promise.resolve({ siteId: "abc" }) }));
    expect(res.status).toBe(404);
  });

  test("an analyst: 202 with the job id; the mapping JSON is validated", async () => {
    const { client, site } = await analystWithSite();
    const ok = await upload(client, site.id, SMALL, { settings: { timestampConvention: "start" } });
    expect(ok.res.status).toBe(202);
    expect(ok.body).toMatchObject({ status: "queued", jobId: expect.any(Number), importId: expect.any(Number) });
    const form = new FormData();
    form.append("mapping", "{not json");
    form.append("file", new Blob([syntheticCsv(1, { seed: 99 })]), "x.csv");
    const bad = await client.call(() => POST(new Request(`${BASE}/api/sites/${site.id}/imports`, { method: "POST", body: form }), ctx(site.id)));
    expect(bad.status).toBe(422);
    const badOffset = await upload(client, site.id, syntheticCsv(1, { seed: 98 }), { settings: { utcOffsetHours: 20 } });
    expect(badOffset.res.status).toBe(422);
  });

  test("not multipart: 415; no file part: 422", async () => {
    const { client, site } = await analystWithSite();
    const plain = await client.call(() => POST(new Request(`${BASE}/api/sites/${site.id}/imports`, { method: "POST", body: SMALL, headers: { "content-type": "text/csv" } }), ctx(site.id)));
    expect(plain.status).toBe(415);
    const form = new FormData();
    form.append("mapping", "{}");
    const none = await client.call(() => POST(new Request(`${BASE}/api/sites/${site.id}/imports`, { method: "POST", body: form }), ctx(site.id)));
    expect(none.status).toBe(422);
    expect(((await none.json()) as { error: { message: string } }).error.message).toMatch(/part named "file"/);
  });

  test("a declared length over the limit: 413 before anything is read", async () => {
    const { client, site } = await analystWithSite();
    const req = new Request(`${BASE}/api/sites/${site.id}/imports`, {
      method: "POST",
      body: "x",
      headers: { "content-type": "multipart/form-data; boundary=zzz", "content-length": String(5e9) },
    });
    const res = await client.call(() => POST(req, ctx(site.id)));
    expect(res.status).toBe(413);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/larger than the upload limit of 1 GB/);
  });

  test("the limit holds while streaming, whatever the declared length", async () => {
    const req = uploadRequest(1, "x".repeat(5000));
    await expect(receiveUpload(req, 1000)).rejects.toMatchObject({ status: 413, message: expect.stringMatching(/larger than the upload limit of 1 kB/) });
  });
});

describe("scripts with a personal API token", () => {
  test("Bearer token: upload and poll the job; a revoked or wrong token is 401", async () => {
    const { site, userId } = await analystWithSite();
    const token = await createApiToken(userId, "tower computer");
    const anon = new FakeClient();
    const auth = { authorization: `Bearer ${token.secret}` };
    const ok = await upload(anon, site.id, SMALL, { headers: auth });
    expect(ok.res.status).toBe(202);
    const job = await anon.call(() => jobGET(new Request(`${BASE}/api/jobs/${ok.body.jobId}`, { headers: auth }), { params: Promise.resolve({ jobId: String(ok.body.jobId) }) }));
    expect(job.status).toBe(200);
    const wrong = await upload(anon, site.id, syntheticCsv(1, { seed: 5 }), { headers: { authorization: "Bearer not-a-token" } });
    expect(wrong.res.status).toBe(401);
    await revokeApiToken(userId, token.id);
    const revoked = await upload(anon, site.id, syntheticCsv(1, { seed: 6 }), { headers: auth });
    expect(revoked.res.status).toBe(401);
  });
});

describe("GET history and jobs", () => {
  test("a viewer reads the history and the job; another group gets 404", async () => {
    const { client, site, groupId } = await analystWithSite();
    const { body } = await upload(client, site.id, SMALL);
    const viewer = await createUserWithGroup({ role: "viewer" });
    await addMember(viewer.user.id, groupId, "viewer");
    const vc = await clientFor(viewer.user, { groupId });
    const list = await vc.call(() => listGET(new Request(`${BASE}/api/sites/${site.id}/imports`), ctx(site.id)));
    expect(list.status).toBe(200);
    expect(((await list.json()) as { imports: { id: number }[] }).imports.map((i) => i.id)).toEqual([body.importId]);
    const job = await vc.call(() => jobGET(new Request(`${BASE}/api/jobs/${body.jobId}`), { params: Promise.resolve({ jobId: String(body.jobId) }) }));
    expect(job.status).toBe(200);
    expect(((await job.json()) as { job: { phase: string; progress: unknown } }).job).toMatchObject({ phase: expect.any(String), progress: expect.any(Object) });

    const stranger = await createUserWithGroup({ role: "lead" });
    const sc = await clientFor(stranger.user);
    expect((await sc.call(() => jobGET(new Request(`${BASE}/api/jobs/${body.jobId}`), { params: Promise.resolve({ jobId: String(body.jobId) }) }))).status).toBe(404);
    expect((await sc.call(() => listGET(new Request(`${BASE}/api/sites/${site.id}/imports`), ctx(site.id)))).status).toBe(404);
    expect(await halfHourCount(site.id)).toBe(0);
  });
});
