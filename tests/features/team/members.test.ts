import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { changeRoleAction, removeMemberAction } from "@/features/team/server/actions";
import { GET as getMembers } from "@/app/api/groups/[groupId]/members/route";
import { DELETE as deleteMember, PATCH as patchMember } from "@/app/api/groups/[groupId]/members/[userId]/route";
import { addMember, clientFor, createUser, createUserWithGroup } from "@/tests/support/db";
import { formData, type FakeClient } from "@/tests/support/next";

const ctx = (groupId: number, userId: string) => ({ params: Promise.resolve({ groupId: String(groupId), userId }) });
const patch = (client: FakeClient, groupId: number, userId: string, role: string) =>
  client.call(() =>
    patchMember(new Request("http://localhost/x", { method: "PATCH", body: JSON.stringify({ role }) }), ctx(groupId, userId)),
  );
const del = (client: FakeClient, groupId: number, userId: string) =>
  client.call(() => deleteMember(new Request("http://localhost/x", { method: "DELETE" }), ctx(groupId, userId)));
const roleOf = async (groupId: number, userId: string) =>
  (await db("memberships").where({ group_id: groupId, user_id: userId }).first("role"))?.role;

describe("members", () => {
  test("every member can list the group; outsiders get 404", async () => {
    const { user: lead, group } = await createUserWithGroup();
    const viewer = await createUser();
    await addMember(viewer.id, group.id, "viewer");
    const res = await (await clientFor(viewer)).call(() =>
      getMembers(new Request("http://localhost/x"), { params: Promise.resolve({ groupId: String(group.id) }) }),
    );
    expect(res.status).toBe(200);
    const body = (await res.json()) as { members: Array<{ userId: string; role: string }> };
    expect(body.members.map((m) => [m.userId, m.role])).toEqual([
      [lead.id, "lead"],
      [viewer.id, "viewer"],
    ]);
    const { user: outsider } = await createUserWithGroup();
    const hidden = await (await clientFor(outsider)).call(() =>
      getMembers(new Request("http://localhost/x"), { params: Promise.resolve({ groupId: String(group.id) }) }),
    );
    expect(hidden.status).toBe(404);
  });

  test("a lead changes roles and removes members; each change is in the audit log", async () => {
    const { user: lead, group } = await createUserWithGroup();
    const analyst = await createUser();
    await addMember(analyst.id, group.id, "analyst");
    const client = await clientFor(lead);

    expect(await client.call(() => changeRoleAction(group.id, analyst.id, { ok: true }, formData({ role: "viewer" })))).toMatchObject({ ok: true });
    expect(await roleOf(group.id, analyst.id)).toBe("viewer");
    expect((await patch(client, group.id, analyst.id, "analyst")).status).toBe(204);
    expect(await client.call(() => removeMemberAction(group.id, analyst.id))).toMatchObject({ ok: true });
    expect(await roleOf(group.id, analyst.id)).toBeUndefined();

    const audit = (await db("audit_log").where({ group_id: group.id, entity_id: analyst.id }).orderBy("id")) as Array<{
      action: string;
      user_id: string;
      detail: { from?: string; to?: string };
    }>;
    expect(audit.map((a) => a.action)).toEqual(["member.role_change", "member.role_change", "member.remove"]);
    expect(audit[0]).toMatchObject({ user_id: lead.id, detail: { from: "analyst", to: "viewer" } });
  });

  test("the last lead can be neither demoted nor removed; with two leads one may go", async () => {
    const { user: lead, group } = await createUserWithGroup();
    const client = await clientFor(lead);
    const demote = await patch(client, group.id, lead.id, "analyst");
    expect(demote.status).toBe(409);
    expect(((await demote.json()) as { error: { code: string } }).error.code).toBe("last_lead");
    expect((await del(client, group.id, lead.id)).status).toBe(409);
    expect(await client.call(() => removeMemberAction(group.id, lead.id))).toMatchObject({ ok: false, message: expect.stringMatching(/at least one lead/) });
    expect(await roleOf(group.id, lead.id)).toBe("lead");

    const second = await createUser();
    await addMember(second.id, group.id, "lead");
    expect((await patch(client, group.id, lead.id, "analyst")).status).toBe(204);
    // Now `second` is the last lead; the demoted first lead cannot act any more.
    expect((await patch(client, group.id, second.id, "viewer")).status).toBe(403);
    const secondClient = await clientFor(second);
    expect((await patch(secondClient, group.id, second.id, "viewer")).status).toBe(409);
  });

  test.each(["analyst", "viewer"] as const)("an %s cannot change roles or remove anyone (403)", async (role) => {
    const { user: lead, group } = await createUserWithGroup();
    const member = await createUser();
    await addMember(member.id, group.id, role);
    const client = await clientFor(member);
    expect((await patch(client, group.id, lead.id, "viewer")).status).toBe(403);
    expect((await patch(client, group.id, member.id, "lead")).status).toBe(403);
    expect((await del(client, group.id, lead.id)).status).toBe(403);
    expect(await roleOf(group.id, lead.id)).toBe("lead");
    expect(await roleOf(group.id, member.id)).toBe(role);
  });

  test("a lead of another group gets 404", async () => {
    const { user: lead, group } = await createUserWithGroup();
    const { user: outsider } = await createUserWithGroup();
    const client = await clientFor(outsider);
    expect((await patch(client, group.id, lead.id, "viewer")).status).toBe(404);
    expect((await del(client, group.id, lead.id)).status).toBe(404);
  });
});
