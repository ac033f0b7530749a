import { describe, expect, test } from "vitest";
import { GET as listGET, POST } from "@/app/api/sites/route";
import { DELETE, GET as oneGET, PATCH } from "@/app/api/sites/[siteId]/route";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import { addMember, clientFor, createSiteFor, createUserWithGroup, uniqueTag } from "@/tests/support/db";
import { FakeClient } from "@/tests/support/next";
import { syntheticSiteFields } from "@/tests/support/sites";

const BASE = "http://localhost:3000";

// An invented tower set-up; heights are plausible for a temperate forest (common practice).
function validBody(overrides: Record<string, unknown> = {}) {
  return { ...syntheticSiteFields(`Route site ${uniqueTag()}`), ...overrides };
}

const req = (path: string, init?: RequestInit) =>
  new Request(`${BASE}${path}`, {
    ...init,
    headers: { "content-type": "application/json", ...init?.headers },
  });
const ctx = (siteId: number | string) => ({ params: Promise.resolve({ siteId: String(siteId) }) });

async function member(role: Role) {
  const { user, group } = await createUserWithGroup({ role });
  return { user, group, client: await clientFor(user, { groupId: group.id }) };
}

async function body(
  res: Response,
): Promise<Record<string, unknown> & { error?: { code: string; fieldErrors?: Record<string, string[]> } }> {
  return (await res.json()) as never;
}

describe("GET /api/sites", () => {
  test("anonymous: 401", async () => {
    const res = await new FakeClient().call(() => listGET(req("/api/sites")));
    expect(res.status).toBe(401);
    expect((await body(res)).error?.code).toBe("unauthenticated");
  });

  test("a viewer gets the sites of the active group, and only those", async () => {
    const { group, client } = await member("viewer");
    const mine = await createSiteFor(group.id);
    const other = await createUserWithGroup();
    await createSiteFor(other.group.id);
    const res = await client.call(() => listGET(req("/api/sites")));
    expect(res.status).toBe(200);
    const data = (await res.json()) as {
      groupId: number;
      sites: Array<{ id: number; coverage: unknown; labelCounts: unknown }>;
    };
    expect(data.groupId).toBe(group.id);
    expect(data.sites.map((s) => s.id)).toEqual([mine.id]);
    expect(data.sites[0]).toMatchObject({ coverage: null, labelCounts: null });
  });

  test("?groupId= of another group: 404, nothing of its data", async () => {
    const { client } = await member("lead");
    const other = await createUserWithGroup();
    await createSiteFor(other.group.id, { name: "Hidden tower" });
    const res = await client.call(() => listGET(req(`/api/sites?groupId=${other.group.id}`)));
    expect(res.status).toBe(404);
    expect(JSON.stringify(await res.json())).not.toContain("Hidden tower");
  });

  test("?groupId= that is not a number: 422", async () => {
    const { client } = await member("viewer");
    const res = await client.call(() => listGET(req("/api/sites?groupId=abc")));
    expect(res.status).toBe(422);
  });
});

describe("POST /api/sites", () => {
  test("anonymous: 401", async () => {
    const res = await new FakeClient().call(() =>
      POST(req("/api/sites", { method: "POST", body: JSON.stringify(validBody()) })),
    );
    expect(res.status).toBe(401);
  });

  test.each(["viewer", "analyst"] as const)("%s: 403 and no row", async (role) => {
    const { group, client } = await member(role);
    const res = await client.call(() =>
      POST(req("/api/sites", { method: "POST", body: JSON.stringify(validBody()) })),
    );
    expect(res.status).toBe(403);
    expect(await db("sites").where({ group_id: group.id }).count({ n: "*" }).first()).toMatchObject({ n: 0 });
  });

  test("a lead of another group naming this group: 404", async () => {
    const { client } = await member("lead");
    const other = await createUserWithGroup();
    const res = await client.call(() =>
      POST(
        req("/api/sites", {
          method: "POST",
          body: JSON.stringify({ ...validBody(), groupId: other.group.id }),
        }),
      ),
    );
    expect(res.status).toBe(404);
  });

  test("lead: 201, the row, and an audit entry", async () => {
    const { user, group, client } = await member("lead");
    const input = validBody();
    const res = await client.call(() =>
      POST(req("/api/sites", { method: "POST", body: JSON.stringify(input) })),
    );
    expect(res.status).toBe(201);
    const { site } = (await res.json()) as {
      site: { id: number; name: string; groupId: number; utcOffsetHours: number };
    };
    expect(site).toMatchObject({ name: input.name, groupId: group.id, utcOffsetHours: 1 });
    const audit = await db("audit_log").where({ entity_type: "site", entity_id: String(site.id) });
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ action: "site.create", user_id: user.id, group_id: group.id });
  });

  test("invalid values: 422 with a message per field", async () => {
    const { client } = await member("lead");
    const res = await client.call(() =>
      POST(
        req("/api/sites", {
          method: "POST",
          body: JSON.stringify(
            validBody({
              latitude: 91,
              longitude: -181,
              measurementHeightM: 0,
              canopyHeightM: -1,
              utcOffsetHours: 5.3,
              name: "",
            }),
          ),
        }),
      ),
    );
    expect(res.status).toBe(422);
    const { error } = await body(res);
    expect(error?.code).toBe("invalid");
    expect(error?.fieldErrors).toMatchObject({
      name: ["Enter a name for the site."],
      latitude: ["The latitude must be at most 90°."],
      longitude: ["The longitude must be at least -180°."],
      measurementHeightM: ["The measurement height must be greater than 0 m."],
      canopyHeightM: ["The canopy height must be at least 0 m."],
      utcOffsetHours: ["The UTC offset must be a whole number of quarter hours (e.g. 5.5 or 5.75)."],
    });
  });

  test("canopy and displacement at or above the measurement height: 422 on those fields", async () => {
    const { client } = await member("lead");
    const res = await client.call(() =>
      POST(
        req("/api/sites", {
          method: "POST",
          body: JSON.stringify(validBody({ canopyHeightM: 32, displacementHeightM: 40 })),
        }),
      ),
    );
    expect(res.status).toBe(422);
    const { error } = await body(res);
    expect(error?.fieldErrors?.canopyHeightM).toEqual([
      "The canopy height must be below the measurement height.",
    ]);
    expect(error?.fieldErrors?.displacementHeightM).toEqual([
      "The displacement height must be below the measurement height.",
    ]);
  });

  test("a name already used in the group: 409 on the name field", async () => {
    const { group, client } = await member("lead");
    const existing = await createSiteFor(group.id);
    const res = await client.call(() =>
      POST(req("/api/sites", { method: "POST", body: JSON.stringify(validBody({ name: existing.name })) })),
    );
    expect(res.status).toBe(409);
    expect((await body(res)).error?.fieldErrors?.name?.[0]).toMatch(/already has this name/);
  });

  test("a body that is not JSON: 400", async () => {
    const { client } = await member("lead");
    const res = await client.call(() => POST(req("/api/sites", { method: "POST", body: "{nope" })));
    expect(res.status).toBe(400);
  });
});

describe("GET/PATCH/DELETE /api/sites/:siteId", () => {
  test("anonymous: 401 on every method", async () => {
    const { group } = await createUserWithGroup();
    const site = await createSiteFor(group.id);
    const anon = new FakeClient();
    expect((await anon.call(() => oneGET(req(`/api/sites/${site.id}`), ctx(site.id)))).status).toBe(401);
    expect(
      (
        await anon.call(() =>
          PATCH(req(`/api/sites/${site.id}`, { method: "PATCH", body: "{}" }), ctx(site.id)),
        )
      ).status,
    ).toBe(401);
    expect(
      (await anon.call(() => DELETE(req(`/api/sites/${site.id}`, { method: "DELETE" }), ctx(site.id))))
        .status,
    ).toBe(401);
  });

  test("a site of another group: 404 on every method, unchanged, and never its data", async () => {
    const { client } = await member("lead");
    const other = await createUserWithGroup();
    const site = await createSiteFor(other.group.id, { name: `Secret ${uniqueTag()}` });
    const get = await client.call(() => oneGET(req(`/api/sites/${site.id}`), ctx(site.id)));
    expect(get.status).toBe(404);
    expect(JSON.stringify(await get.json())).not.toContain(site.name);
    const patch = await client.call(() =>
      PATCH(
        req(`/api/sites/${site.id}`, { method: "PATCH", body: JSON.stringify({ name: "Taken over" }) }),
        ctx(site.id),
      ),
    );
    expect(patch.status).toBe(404);
    const del = await client.call(() =>
      DELETE(req(`/api/sites/${site.id}`, { method: "DELETE" }), ctx(site.id)),
    );
    expect(del.status).toBe(404);
    expect(await db("sites").where({ id: site.id }).first()).toMatchObject({ name: site.name });
  });

  test("a missing or malformed id: 404 like another group's site", async () => {
    const { client } = await member("viewer");
    expect((await client.call(() => oneGET(req("/api/sites/999999999"), ctx(999999999)))).status).toBe(404);
    expect((await client.call(() => oneGET(req("/api/sites/abc"), ctx("abc")))).status).toBe(404);
  });

  test("a viewer reads the site", async () => {
    const { group, client } = await member("viewer");
    const site = await createSiteFor(group.id);
    const res = await client.call(() => oneGET(req(`/api/sites/${site.id}`), ctx(site.id)));
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ site: { id: site.id, name: site.name }, role: "viewer" });
  });

  test.each(["viewer", "analyst"] as const)(
    "%s: PATCH and DELETE are 403, the site is unchanged",
    async (role) => {
      const { group, client } = await member(role);
      const site = await createSiteFor(group.id);
      const patch = await client.call(() =>
        PATCH(
          req(`/api/sites/${site.id}`, { method: "PATCH", body: JSON.stringify({ canopyHeightM: 5 }) }),
          ctx(site.id),
        ),
      );
      expect(patch.status).toBe(403);
      const del = await client.call(() =>
        DELETE(req(`/api/sites/${site.id}`, { method: "DELETE" }), ctx(site.id)),
      );
      expect(del.status).toBe(403);
      expect(await db("sites").where({ id: site.id }).first()).toMatchObject({ canopy_height_m: 20 });
    },
  );

  test("lead: PATCH merges, validates the whole, and audits the change", async () => {
    const { user, group, client } = await member("lead");
    const site = await createSiteFor(group.id);
    const bad = await client.call(() =>
      PATCH(
        req(`/api/sites/${site.id}`, { method: "PATCH", body: JSON.stringify({ canopyHeightM: 35 }) }),
        ctx(site.id),
      ),
    );
    expect(bad.status).toBe(422);
    expect((await body(bad)).error?.fieldErrors?.canopyHeightM).toEqual([
      "The canopy height must be below the measurement height.",
    ]);

    const res = await client.call(() =>
      PATCH(
        req(`/api/sites/${site.id}`, {
          method: "PATCH",
          body: JSON.stringify({ canopyHeightM: 22.5, utcOffsetHours: 5.75 }),
        }),
        ctx(site.id),
      ),
    );
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({
      site: { canopyHeightM: 22.5, utcOffsetHours: 5.75, name: site.name },
    });
    const audit = (await db("audit_log")
      .where({ entity_type: "site", entity_id: String(site.id), action: "site.update" })
      .first()) as { user_id: string; group_id: number; detail: unknown } | undefined;
    expect(audit).toMatchObject({ user_id: user.id, group_id: group.id });
    const raw = audit?.detail;
    const detail = (typeof raw === "string" ? JSON.parse(raw) : raw) as {
      changes: Record<string, { from: unknown; to: unknown }>;
    };
    expect(detail.changes).toEqual({
      canopyHeightM: { from: 20, to: 22.5 },
      utcOffsetHours: { from: 1, to: 5.75 },
    });
  });

  test("lead: DELETE removes the site and audits it", async () => {
    const { user, group, client } = await member("lead");
    const site = await createSiteFor(group.id);
    const res = await client.call(() =>
      DELETE(req(`/api/sites/${site.id}`, { method: "DELETE" }), ctx(site.id)),
    );
    expect(res.status).toBe(204);
    expect(await db("sites").where({ id: site.id }).first()).toBeUndefined();
    expect(
      await db("audit_log")
        .where({ entity_id: String(site.id), action: "site.delete" })
        .first(),
    ).toMatchObject({
      user_id: user.id,
      group_id: group.id,
    });
  });

  test("a member of two groups reads a site of the group that is not active", async () => {
    const { user, client } = await member("viewer");
    const second = await createUserWithGroup();
    await addMember(user.id, second.group.id, "analyst");
    const site = await createSiteFor(second.group.id);
    const res = await client.call(() => oneGET(req(`/api/sites/${site.id}`), ctx(site.id)));
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ role: "analyst" });
  });
});
