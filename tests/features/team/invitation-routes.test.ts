import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { DELETE as revokeRoute } from "@/app/api/groups/[groupId]/invitations/[invitationId]/route";
import { POST as resendRoute } from "@/app/api/groups/[groupId]/invitations/[invitationId]/resend/route";
import { POST as inviteRoute } from "@/app/api/groups/[groupId]/invitations/route";
import { addMember, clientFor, createUser, createUserWithGroup, uniqueEmail } from "@/tests/support/db";
import { FakeClient } from "@/tests/support/next";

const ctx = (groupId: number | string, invitationId: number | string) => ({
  params: Promise.resolve({ groupId: String(groupId), invitationId: String(invitationId) }),
});
const resend = (client: FakeClient, groupId: number | string, id: number | string) =>
  client.call(() => resendRoute(new Request("http://localhost/x", { method: "POST" }), ctx(groupId, id)));
const revoke = (client: FakeClient, groupId: number | string, id: number | string) =>
  client.call(() => revokeRoute(new Request("http://localhost/x", { method: "DELETE" }), ctx(groupId, id)));

async function invited() {
  const { user: lead, group } = await createUserWithGroup({ role: "lead" });
  const client = await clientFor(lead, { groupId: group.id });
  const email = uniqueEmail("route-invitee");
  const res = await client.call(() =>
    inviteRoute(
      new Request("http://localhost/x", { method: "POST", body: JSON.stringify({ email, role: "viewer" }) }),
      { params: Promise.resolve({ groupId: String(group.id) }) },
    ),
  );
  expect(res.status).toBe(201);
  const { invitationId } = (await res.json()) as { invitationId: number };
  return { group, client, invitationId };
}

const codeOf = async (res: Response) => ((await res.json()) as { error?: { code?: string } }).error?.code;

// Both routes go through one handler; each is checked for every answer it can give.
describe.each([
  ["resend", resend],
  ["revoke", revoke],
] as const)("%s route", (name, call) => {
  test("no session: 401", async () => {
    const { group, invitationId } = await invited();
    expect((await call(new FakeClient(), group.id, invitationId)).status).toBe(401);
  });

  test("a malformed or unknown id, or another group's invitation: 404", async () => {
    const { group, client, invitationId } = await invited();
    expect((await call(client, "abc", invitationId)).status).toBe(404);
    expect((await call(client, group.id, "x1")).status).toBe(404);
    expect((await call(client, group.id, 999_999_999)).status).toBe(404);
    const outsider = await createUserWithGroup({ role: "lead" });
    const outsiderClient = await clientFor(outsider.user);
    expect((await call(outsiderClient, group.id, invitationId)).status).toBe(404);
    // a lead of their own group cannot reach this invitation through it
    expect((await call(outsiderClient, outsider.group.id, invitationId)).status).toBe(404);
  });

  test("an analyst of the group: 403, nothing changed", async () => {
    const { group, invitationId } = await invited();
    const analyst = await createUser();
    await addMember(analyst.id, group.id, "analyst");
    const before = await db("invitations").where({ id: invitationId }).first();
    expect((await call(await clientFor(analyst), group.id, invitationId)).status).toBe(403);
    expect(await db("invitations").where({ id: invitationId }).first()).toEqual(before);
  });

  test(`the lead: 204 and an audit row; on a revoked invitation 409 not_pending`, async () => {
    const { group, client, invitationId } = await invited();
    expect((await call(client, group.id, invitationId)).status).toBe(204);
    const actions = await db("audit_log")
      .where({ group_id: group.id, entity_type: "invitation" })
      .pluck("action");
    expect(actions).toContain(`invitation.${name}`);
    if (name === "resend") expect((await revoke(client, group.id, invitationId)).status).toBe(204);
    const again = await call(client, group.id, invitationId);
    expect(again.status).toBe(409);
    expect(await codeOf(again)).toBe("not_pending");
  });
});
