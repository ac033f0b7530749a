import { describe, expect, test } from "vitest";
import { GET as listGET } from "@/app/api/sites/[siteId]/evenings/route";
import { GET as queueGET } from "@/app/api/sites/[siteId]/evenings/queue/route";
import { GET as eveningGET } from "@/app/api/evenings/[eveningId]/route";
import { POST as overridePOST } from "@/app/api/evenings/[eveningId]/overrides/route";
import { POST as revertPOST } from "@/app/api/evenings/[eveningId]/revert/route";
import { POST as reviewedPOST } from "@/app/api/evenings/[eveningId]/reviewed/route";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";
import { FakeClient } from "@/tests/support/next";
import type { ConflictBody, EveningDetail, EveningSummary, QueueItem } from "@/features/review/schemas";
import { insertEvenings } from "@/tests/features/review/fixtures";

const BASE = "http://localhost:3000";
const post = (path: string, body: unknown) =>
  new Request(`${BASE}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
const get = (path: string) => new Request(`${BASE}${path}`);
const eve = (id: number) => ({ params: Promise.resolve({ eveningId: String(id) }) });
const site = (id: number) => ({ params: Promise.resolve({ siteId: String(id) }) });

/** A group with a site of three synthetic evenings and one client per role. */
async function scene() {
  const { user: lead, group } = await createUserWithGroup({ role: "lead" });
  const s = await createSiteFor(group.id);
  const ids = await insertEvenings(s.id, [
    { date: "2025-06-01", autoLabel: "local" },
    { date: "2025-06-02", autoLabel: "unclassified" },
    {
      date: "2025-06-03",
      autoLabel: "stagnant",
      rule: "still-air",
      margins: { stillUstar: 0.002, stillWind: 0.6 },
    },
  ]);
  const clients: Record<Role, FakeClient> = {
    lead: await clientFor(lead, { groupId: group.id }),
    analyst: await member(group.id, "analyst"),
    viewer: await member(group.id, "viewer"),
  };
  return { group, site: s, ids: ids as [number, number, number], clients };
}

async function member(groupId: number, role: Role): Promise<FakeClient> {
  const u = await createUser({ displayName: `Test ${role}` });
  await addMember(u.id, groupId, role);
  return clientFor(u, { groupId });
}

const override = (c: FakeClient, id: number, body: unknown) =>
  c.call(() => overridePOST(post(`/api/evenings/${id}/overrides`, body), eve(id)));
const detail = async (c: FakeClient, id: number) =>
  (await (await c.call(() => eveningGET(get(`/api/evenings/${id}`), eve(id)))).json()) as EveningDetail;

describe("GET /api/sites/:id/evenings", () => {
  test("lists the evenings of the period in the documented shape", async () => {
    const { site: s, ids, clients } = await scene();
    const res = await clients.viewer.call(() =>
      listGET(get(`/api/sites/${s.id}/evenings?from=2025-06-02&to=2025-06-30`), site(s.id)),
    );
    expect(res.status).toBe(200);
    const { evenings } = (await res.json()) as { evenings: EveningSummary[] };
    expect(evenings.map((e) => e.id)).toEqual([ids[1], ids[2]]);
    expect(Object.keys(evenings[0]!).sort()).toEqual(
      [
        "id",
        "date",
        "label",
        "autoLabel",
        "source",
        "sunsetUtc",
        "civilDuskUtc",
        "rule",
        "reasons",
        "metrics",
        "reviewed",
        "version",
      ].sort(),
    );
    expect(evenings[0]).toMatchObject({
      date: "2025-06-02",
      label: "unclassified",
      autoLabel: "unclassified",
      source: "auto",
      sunsetUtc: "2025-06-02T19:10:00Z",
      civilDuskUtc: "2025-06-02T19:45:00Z",
      rule: null,
      reasons: ["coverage of evening window 0.2 < 0.5"],
      reviewed: false,
      version: 1,
    });
  });

  test("bad dates: 422 naming the field; anonymous 401; other group 404", async () => {
    const { site: s, clients } = await scene();
    const bad = await clients.viewer.call(() =>
      listGET(get(`/api/sites/${s.id}/evenings?from=2025-02-30&to=2025-03-01`), site(s.id)),
    );
    expect(bad.status).toBe(422);
    expect(
      ((await bad.json()) as { error: { fieldErrors: Record<string, string[]> } }).error.fieldErrors.from,
    ).toBeDefined();
    const anon = await new FakeClient().call(() =>
      listGET(get(`/api/sites/${s.id}/evenings?from=2025-06-01&to=2025-06-30`), site(s.id)),
    );
    expect(anon.status).toBe(401);
    const other = await createUserWithGroup({ role: "lead" });
    const outsider = await clientFor(other.user, { groupId: other.group.id });
    const hidden = await outsider.call(() =>
      listGET(get(`/api/sites/${s.id}/evenings?from=2025-06-01&to=2025-06-30`), site(s.id)),
    );
    expect(hidden.status).toBe(404);
  });
});

describe("overrides", () => {
  test("an analyst overrides with a note: label, source, version and history change; audit row written", async () => {
    const { group, ids, clients } = await scene();
    const res = await override(clients.analyst, ids[0], {
      label: "advective",
      note: "Front passage visible in TA and WD.",
      version: 1,
    });
    expect(res.status).toBe(200);
    const { evening } = (await res.json()) as { evening: EveningSummary };
    expect(evening).toMatchObject({
      label: "advective",
      autoLabel: "local",
      source: "override",
      version: 2,
      reviewed: true,
    });

    const d = await detail(clients.viewer, ids[0]);
    expect(d.evening.overrideNote).toBe("Front passage visible in TA and WD.");
    expect(d.history.map((h) => [h.kind, h.fromLabel, h.toLabel])).toEqual([
      ["auto", null, "local"],
      ["override", "local", "advective"],
    ]);
    expect(d.history[0]?.ruleSetVersion).toBe(1);
    expect(d.history[1]).toMatchObject({ note: "Front passage visible in TA and WD.", user: "Test analyst" });
    const audit = await db("audit_log").where({
      group_id: group.id,
      action: "evening.override",
      entity_id: String(ids[0]),
    });
    expect(audit).toHaveLength(1);
  });

  test("the note is required; an unknown label is refused; both 422 and nothing changes", async () => {
    const { ids, clients } = await scene();
    const noNote = await override(clients.analyst, ids[0], { label: "stagnant", note: "   ", version: 1 });
    expect(noNote.status).toBe(422);
    expect(
      ((await noNote.json()) as { error: { fieldErrors: Record<string, string[]> } }).error.fieldErrors
        .note?.[0],
    ).toMatch(/note/i);
    const badLabel = await override(clients.analyst, ids[0], { label: "windy", note: "x", version: 1 });
    expect(badLabel.status).toBe(422);
    const same = await override(clients.analyst, ids[0], { label: "local", note: "agree", version: 1 });
    expect(same.status).toBe(422);
    const row: unknown = await db("evenings").where({ id: ids[0] }).first("final_label", "version");
    expect(row).toMatchObject({ final_label: "local", version: 1 });
  });

  test("two people at once: the second gets 409 with the newer label, the first one's change stays", async () => {
    const { ids, clients } = await scene();
    const first = await override(clients.analyst, ids[1], {
      label: "stagnant",
      note: "Calm and fog, sensor iced.",
      version: 1,
    });
    expect(first.status).toBe(200);
    const second = await override(clients.lead, ids[1], {
      label: "advective",
      note: "I think the wind turned.",
      version: 1,
    });
    expect(second.status).toBe(409);
    const body = (await second.json()) as ConflictBody;
    expect(body.error.code).toBe("conflict");
    expect(body.error.current).toEqual({
      label: "stagnant",
      source: "override",
      version: 2,
      by: "Test analyst",
    });
    expect(body.error.message).toMatch(/stagnant/);
    const d = await detail(clients.viewer, ids[1]);
    expect(d.evening.label).toBe("stagnant");
    expect(d.history.filter((h) => h.kind === "override")).toHaveLength(1);
  });

  test("concurrent requests with the same version: exactly one wins", async () => {
    const { ids, clients } = await scene();
    const results = await Promise.all([
      override(clients.analyst, ids[2], { label: "local", note: "a", version: 1 }),
      override(clients.lead, ids[2], { label: "advective", note: "b", version: 1 }),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 409]);
    const events = await db("evening_events").where({ evening_id: ids[2], kind: "override" });
    expect(events).toHaveLength(1);
  });

  test("roles: viewer 403, another group 404, anonymous 401; nothing changes", async () => {
    const { ids, clients } = await scene();
    const body = { label: "stagnant", note: "n", version: 1 };
    expect((await override(clients.viewer, ids[0], body)).status).toBe(403);
    const other = await createUserWithGroup({ role: "lead" });
    const outsider = await clientFor(other.user, { groupId: other.group.id });
    expect((await override(outsider, ids[0], body)).status).toBe(404);
    expect((await outsider.call(() => eveningGET(get(`/api/evenings/${ids[0]}`), eve(ids[0])))).status).toBe(
      404,
    );
    expect((await override(new FakeClient(), ids[0], body)).status).toBe(401);
    expect((await override(clients.analyst, 999_999_999, body)).status).toBe(404);
    const row: unknown = await db("evenings").where({ id: ids[0] }).first("final_label", "version");
    expect(row).toMatchObject({ final_label: "local", version: 1 });
  });
});

describe("revert and reviewed", () => {
  test("a lead reverts to the automatic label; the revert is in the history after the override", async () => {
    const { ids, clients } = await scene();
    await override(clients.analyst, ids[0], { label: "stagnant", note: "Looks calm.", version: 1 });
    const analystTry = await clients.analyst.call(() =>
      revertPOST(post(`/api/evenings/${ids[0]}/revert`, { version: 2 }), eve(ids[0])),
    );
    expect(analystTry.status).toBe(403);
    const stale = await clients.lead.call(() =>
      revertPOST(post(`/api/evenings/${ids[0]}/revert`, { version: 1 }), eve(ids[0])),
    );
    expect(stale.status).toBe(409);
    const res = await clients.lead.call(() =>
      revertPOST(
        post(`/api/evenings/${ids[0]}/revert`, { version: 2, note: "The rules were right." }),
        eve(ids[0]),
      ),
    );
    expect(res.status).toBe(200);
    expect(((await res.json()) as { evening: EveningSummary }).evening).toMatchObject({
      label: "local",
      source: "auto",
      version: 3,
    });
    const d = await detail(clients.viewer, ids[0]);
    expect(d.history.map((h) => [h.kind, h.fromLabel, h.toLabel, h.note])).toEqual([
      ["auto", null, "local", null],
      ["override", "local", "stagnant", "Looks calm."],
      ["revert", "stagnant", "local", "The rules were right."],
    ]);
    expect(d.evening.overrideNote).toBeNull();
    const again = await clients.lead.call(() =>
      revertPOST(post(`/api/evenings/${ids[0]}/revert`, { version: 3 }), eve(ids[0])),
    );
    expect(again.status).toBe(422);
  });

  test("mark reviewed: analyst yes, viewer 403; marking twice adds one history entry", async () => {
    const { ids, clients } = await scene();
    const path = `/api/evenings/${ids[1]}/reviewed`;
    expect(
      (await clients.viewer.call(() => reviewedPOST(post(path, { version: 1 }), eve(ids[1])))).status,
    ).toBe(403);
    const ok = await clients.analyst.call(() => reviewedPOST(post(path, { version: 1 }), eve(ids[1])));
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { evening: EveningSummary }).evening).toMatchObject({
      reviewed: true,
      version: 2,
    });
    const twice = await clients.analyst.call(() => reviewedPOST(post(path, { version: 1 }), eve(ids[1])));
    expect(twice.status).toBe(200);
    expect(await db("evening_events").where({ evening_id: ids[1], kind: "reviewed" })).toHaveLength(1);
  });
});

describe("GET /api/evenings/:id and the queue", () => {
  test("the evening detail carries thresholds with the deciding rule, neighbours and an empty series", async () => {
    const { ids, clients } = await scene();
    const res = await clients.viewer.call(() => eveningGET(get(`/api/evenings/${ids[1]}`), eve(ids[1])));
    // per person, asked again each time, and sent as it is (no per-request compression)
    expect(res.headers.get("cache-control")).toBe("private, no-cache, no-transform");
    const d = await detail(clients.viewer, ids[1]);
    expect(d.neighbours.previous?.id).toBe(ids[0]);
    expect(d.neighbours.next?.id).toBe(ids[2]);
    const s = await detail(clients.viewer, ids[2]);
    const decided = s.thresholds
      .filter((t) => t.deciding)
      .map((t) => t.name)
      .sort();
    expect(decided).toEqual(["stillUstar", "stillWind"]);
    // threshold recovered from the stored margin: 0.18 + 0.002 (synthetic fixture values)
    expect(s.thresholds.find((t) => t.name === "stillUstar")?.threshold).toBeCloseTo(0.182, 9);
    expect(s.windows.map((w) => w.name)).toEqual(["afternoon", "transition", "evening"]);
    expect(s.series.columns.map((c) => c.key)).toEqual(["W_SIGMA", "USTAR", "WS", "WD", "ZL", "H", "TA"]);
  });

  test("the history comes whole and in order, with notes as written, also when longer than the database's JSON aggregate limit", async () => {
    const { site: s, ids, clients } = await scene();
    const note = `front passed: "TA" fell <3 K> in 1 h; ümlaut \\ backslash`;
    expect((await override(clients.analyst, ids[0], { label: "advective", note, version: 1 })).status).toBe(200);
    const d = await detail(clients.viewer, ids[0]);
    expect(d.history.map((h) => h.kind)).toEqual(["auto", "override"]);
    expect(d.history[1]).toMatchObject({ fromLabel: "local", toLabel: "advective", note, user: "Test analyst" });
    expect(d.history[1]?.at).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
    await db("site_series").insert([
      { site_id: s.id, slot: 2, name: "N2O", unit: "nmol/mol", kind: "concentration" },
      { site_id: s.id, slot: 1, name: "O3", unit: "nmol/mol", kind: "concentration" },
    ]);
    const withTracers = await detail(clients.viewer, ids[0]);
    expect(withTracers.series.columns.slice(-2).map((c) => c.key)).toEqual(["tracer_1", "tracer_2"]);

    // More history than one JSON_ARRAYAGG may hold: the detail falls back to reading it row by row.
    const { limit } = (await db.select(db.raw("@@group_concat_max_len AS `limit`")).first()) as { limit: number };
    const many = Math.ceil(Number(limit) / 2000) + 10;
    expect(many, "rows needed to pass group_concat_max_len").toBeLessThan(20_000);
    const long = "x".repeat(1990);
    for (let i = 0; i < many; i += 500)
      await db("evening_events").insert(
        Array.from({ length: Math.min(500, many - i) }, (_, k) => ({ evening_id: ids[2], kind: "reviewed", note: `${i + k} ${long}` })),
      );
    const big = await detail(clients.viewer, ids[2]);
    expect(big.history.length).toBe(many + 1);
    expect(big.history[0]?.kind).toBe("auto");
    expect(big.history.slice(1).map((h) => Number(h.note?.split(" ")[0]))).toEqual(Array.from({ length: many }, (_, k) => k));
  });

  test("the queue puts unclassified first, then the smallest margin, reviewed last", async () => {
    const { site: s, ids, clients } = await scene();
    await clients.analyst.call(() =>
      reviewedPOST(post(`/api/evenings/${ids[1]}/reviewed`, { version: 1 }), eve(ids[1])),
    );
    const res = await clients.viewer.call(() =>
      queueGET(get(`/api/sites/${s.id}/evenings/queue?from=2025-06-01&to=2025-06-30`), site(s.id)),
    );
    const { queue } = (await res.json()) as { queue: QueueItem[] };
    expect(queue.map((q) => q.id)).toEqual([ids[2], ids[0], ids[1]]);
    expect(queue[0]?.why).toMatch(/stillUstar/);
  });
});
