import { describe, expect, test } from "vitest";
import { hashLinkToken } from "@/lib/auth/link-token";
import { getCurrentSession, listMemberships } from "@/lib/auth/session";
import { db } from "@/lib/db/knex";
import { env } from "@/lib/env";
import type { InvitationRow } from "@/lib/db/tables";
import { acceptInvitationAction, inviteAction, resendInvitationAction, revokeInvitationAction } from "@/features/team/server/actions";
import { viewInvitationByHash } from "@/features/team/server/queries";
import { POST as postInvitation } from "@/app/api/groups/[groupId]/invitations/route";
import { addMember, clientFor, createUser, createUserWithGroup, uniqueEmail } from "@/tests/support/db";
import { FakeClient, formData } from "@/tests/support/next";
import { deliverFor, linkIn, tokenOf } from "@/tests/support/mail";

async function invite(role: "lead" | "analyst" | "viewer" = "analyst") {
  const { user: lead, group } = await createUserWithGroup({ role: "lead" });
  const client = await clientFor(lead, { groupId: group.id });
  const email = uniqueEmail("invitee");
  const state = await client.call(() => inviteAction(group.id, { ok: true }, formData({ email: email.toUpperCase(), role })));
  expect(state).toMatchObject({ ok: true });
  const mails = await deliverFor(email);
  expect(mails).toHaveLength(1);
  const link = linkIn(mails[0]!.text, "/invitations/");
  return { lead, group, client, email, mail: mails[0]!, link, token: tokenOf(link) };
}

describe("invitations", () => {
  test("the invitation mail arrives with a working link; accepting creates the account, the membership and a session", async () => {
    const { group, email, mail, link, token } = await invite("analyst");
    expect(mail.subject).toBe(`Invitation to ${group.name} on Gloaming`);
    expect(link.origin).toBe(new URL(env.APP_URL).origin);
    // Only the hash is stored.
    const row = await db("invitations").where({ email }).first<InvitationRow>();
    expect(row.token_hash).toBe(hashLinkToken(token));
    expect(JSON.stringify(row)).not.toContain(token);
    const expiresInDays = (row.expires_at.getTime() - row.sent_at.getTime()) / 86_400_000;
    expect(expiresInDays).toBeCloseTo(7, 3);

    expect(await viewInvitationByHash(hashLinkToken(token))).toMatchObject({ state: "pending", email, role: "analyst", accountExists: false });

    const browser = new FakeClient();
    const outcome = await browser.run(() =>
      acceptInvitationAction(token, { ok: true }, formData({ displayName: "Invited Person", password: "a-long-password" })),
    );
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });
    const session = await browser.call(() => getCurrentSession());
    expect(session?.user.email).toBe(email);
    expect(await listMemberships(session!.user.id)).toEqual([{ groupId: group.id, groupName: group.name, role: "analyst" }]);
    expect(browser.cookies.get("gloaming_group")?.value).toBe(String(group.id));
    expect(await db("audit_log").where({ group_id: group.id }).pluck("action")).toEqual(
      expect.arrayContaining(["invitation.create", "invitation.accept"]),
    );

    // The link works once.
    const again = await new FakeClient().call(() =>
      acceptInvitationAction(token, { ok: true }, formData({ displayName: "Someone Else", password: "another-long-one" })),
    );
    expect(again).toMatchObject({ ok: false, message: expect.stringMatching(/not valid any more/) });
    expect(await viewInvitationByHash(hashLinkToken(token))).toMatchObject({ state: "accepted" });
  });

  test("an expired link is refused", async () => {
    const { email, token } = await invite();
    await db("invitations").where({ email }).update({ expires_at: new Date(Date.now() - 1000) });
    const outcome = await new FakeClient().call(() =>
      acceptInvitationAction(token, { ok: true }, formData({ displayName: "Late", password: "a-long-password" })),
    );
    expect(outcome.ok).toBe(false);
    expect(await db("users").where({ email }).first()).toBeUndefined();
  });

  test("an existing account joins with its password; a wrong password is refused", async () => {
    const { user: lead, group } = await createUserWithGroup({ role: "lead" });
    const existing = await createUser();
    const client = await clientFor(lead);
    await client.call(() => inviteAction(group.id, { ok: true }, formData({ email: existing.email, role: "viewer" })));
    const token = tokenOf(linkIn((await deliverFor(existing.email))[0]!.text, "/invitations/"));

    const wrong = await new FakeClient().call(() => acceptInvitationAction(token, { ok: true }, formData({ password: "not-the-password" })));
    expect(wrong.fieldErrors?.password).toEqual(["The password is not right."]);
    const outcome = await new FakeClient().run(() => acceptInvitationAction(token, { ok: true }, formData({ password: existing.password })));
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });
    expect(await listMemberships(existing.id)).toEqual([{ groupId: group.id, groupName: group.name, role: "viewer" }]);
  });

  test("resend sends a new link and retires the old one; revoke retires it too", async () => {
    const { group, client, email, token: first } = await invite();
    const row = await db("invitations").where({ email }).first<{ id: number }>("id");
    expect(await client.call(() => resendInvitationAction(group.id, row.id))).toMatchObject({ ok: true });
    const mails = await deliverFor(email);
    expect(mails).toHaveLength(2);
    const second = tokenOf(linkIn(mails[1]!.text, "/invitations/"));
    expect(second).not.toBe(first);
    expect(await viewInvitationByHash(hashLinkToken(first))).toEqual({ state: "unknown" });
    expect(await viewInvitationByHash(hashLinkToken(second))).toMatchObject({ state: "pending" });

    expect(await client.call(() => revokeInvitationAction(group.id, row.id))).toMatchObject({ ok: true });
    const refused = await new FakeClient().call(() =>
      acceptInvitationAction(second, { ok: true }, formData({ displayName: "Too late", password: "a-long-password" })),
    );
    expect(refused.ok).toBe(false);
    expect(await db("audit_log").where({ group_id: group.id, entity_type: "invitation" }).pluck("action")).toEqual(
      expect.arrayContaining(["invitation.create", "invitation.resend", "invitation.revoke"]),
    );
  });

  test("a signed-in person with another address cannot take someone else's invitation", async () => {
    const { token } = await invite();
    const other = await createUser();
    const client = await clientFor(other);
    const state = await client.call(() => acceptInvitationAction(token, { ok: true }, formData({})));
    expect(state).toMatchObject({ ok: false, message: expect.stringMatching(/This invitation is for/) });
  });

  test("an address that is already a member or already invited is refused", async () => {
    const { group, client, email } = await invite();
    const again = await client.call(() => inviteAction(group.id, { ok: true }, formData({ email, role: "viewer" })));
    expect(again).toMatchObject({ ok: false, message: expect.stringMatching(/open invitation/) });
    const member = await createUser();
    await addMember(member.id, group.id, "viewer");
    const dup = await client.call(() => inviteAction(group.id, { ok: true }, formData({ email: member.email, role: "viewer" })));
    expect(dup).toMatchObject({ ok: false, message: expect.stringMatching(/already a member/) });
  });
});

describe("who may invite", () => {
  const post = (client: FakeClient, groupId: number, body: unknown) =>
    client.call(() =>
      postInvitation(
        new Request(`http://localhost/api/groups/${groupId}/invitations`, { method: "POST", body: JSON.stringify(body) }),
        { params: Promise.resolve({ groupId: String(groupId) }) },
      ),
    );

  test.each(["analyst", "viewer"] as const)("an %s gets 403 and nothing is sent", async (role) => {
    const { user, group } = await createUserWithGroup({ role });
    const email = uniqueEmail("nope");
    const res = await post(await clientFor(user), group.id, { email, role: "viewer" });
    expect(res.status).toBe(403);
    expect(await db("invitations").where({ email }).first()).toBeUndefined();
    expect(await db("mail_outbox").where({ to_address: email }).first()).toBeUndefined();
  });

  test("a lead of another group gets 404; no session gets 401; a lead gets 201; bad input 422", async () => {
    const { group } = await createUserWithGroup({ role: "lead" });
    const { user: outsider } = await createUserWithGroup({ role: "lead" });
    expect((await post(await clientFor(outsider), group.id, { email: uniqueEmail(), role: "viewer" })).status).toBe(404);
    expect((await post(new FakeClient(), group.id, { email: uniqueEmail(), role: "viewer" })).status).toBe(401);
    const { user: lead, group: own } = await createUserWithGroup({ role: "lead" });
    const res = await post(await clientFor(lead), own.id, { email: uniqueEmail(), role: "analyst" });
    expect(res.status).toBe(201);
    const bad = await post(await clientFor(lead), own.id, { email: "nope", role: "boss" });
    expect(bad.status).toBe(422);
  });
});
