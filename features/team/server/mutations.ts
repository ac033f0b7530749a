import "server-only";
import { generateIdFromEntropySize } from "lucia";
import type { Knex } from "knex";
import { hashLinkToken, isLinkTokenShape, newLinkToken } from "@/lib/auth/link-token";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { AuthError, requireRole, type SessionUser } from "@/lib/auth/session";
import { recordAudit } from "@/lib/db/audit";
import { db } from "@/lib/db/knex";
import { queueMail } from "@/lib/mail/outbox";
import {
  acceptExistingSchema,
  acceptNewSchema,
  type InviteInput,
  type TeamActionState,
} from "@/features/team/schemas";
import { invitationMail } from "@/features/team/server/mail";
import type { InvitationRow } from "@/lib/db/tables";
import { invitationStatus } from "@/features/team/server/queries";

/*
 * Member and invitation changes, shared by the server actions and the route handlers. Each
 * checks the caller's role itself (lead only), and writes its audit row, and any mail, in the
 * transaction of the change.
 */

/** Invitations expire this long after they are sent (or re-sent), in ms. */
export const INVITATION_TTL_MS = 7 * 24 * 60 * 60_000;

export type TeamProblem = "already_member" | "already_invited" | "last_lead" | "not_pending" | "not_found";
export type TeamResult<T = object> = ({ ok: true } & T) | { ok: false; code: TeamProblem; message: string };

const problem = (code: TeamProblem, message: string): { ok: false; code: TeamProblem; message: string } => ({
  ok: false,
  code,
  message,
});

async function groupName(groupId: number, trx: Knex | Knex.Transaction = db): Promise<string> {
  const row = await trx("research_groups").where({ id: groupId }).first<{ name: string } | undefined>("name");
  if (!row) throw new AuthError("not_found");
  return row.name;
}

/** Invites an address into a group with a role and queues the mail (lead only). */
export async function inviteMember(groupId: number, input: InviteInput): Promise<TeamResult<{ invitationId: number }>> {
  const { user } = await requireRole(groupId, "lead");
  return db.transaction(async (trx) => {
    const member = await trx("memberships as m")
      .join("users as u", "u.id", "m.user_id")
      .where({ "m.group_id": groupId, "u.email": input.email })
      .first<{ user_id: string } | undefined>("m.user_id");
    if (member) return problem("already_member", "This person is already a member of the group.");
    const open = await trx("invitations")
      .where({ group_id: groupId, email: input.email })
      .whereNull("accepted_at")
      .whereNull("revoked_at")
      .andWhere("expires_at", ">", new Date())
      .forUpdate()
      .first<{ id: number } | undefined>("id");
    if (open) return problem("already_invited", "This address has an open invitation; resend or revoke it instead.");

    const { token, hash } = newLinkToken();
    const expiresAt = new Date(Date.now() + INVITATION_TTL_MS);
    const [id] = await trx("invitations").insert({
      group_id: groupId,
      email: input.email,
      role: input.role,
      token_hash: hash,
      invited_by: user.id,
      expires_at: expiresAt,
      sent_at: new Date(),
    });
    if (id === undefined) throw new Error("invitation insert returned no id");
    await queueMail(
      invitationMail({ to: input.email, token, groupName: await groupName(groupId, trx), role: input.role, inviterName: user.displayName, expiresAt }),
      trx,
    );
    await recordAudit(
      { groupId, userId: user.id, action: "invitation.create", entityType: "invitation", entityId: id, detail: { email: input.email, role: input.role } },
      trx,
    );
    return { ok: true as const, invitationId: id };
  });
}

async function lockInvitation(trx: Knex.Transaction, groupId: number, invitationId: number): Promise<InvitationRow> {
  const row = await trx("invitations").where({ id: invitationId, group_id: groupId }).forUpdate().first();
  if (!row) throw new AuthError("not_found");
  return row;
}

/** Sends a fresh link (the old one stops working) and restarts the 7 days (lead only). */
export async function resendInvitation(groupId: number, invitationId: number): Promise<TeamResult> {
  const { user } = await requireRole(groupId, "lead");
  return db.transaction(async (trx) => {
    const row = await lockInvitation(trx, groupId, invitationId);
    const status = invitationStatus(row);
    if (status === "accepted" || status === "revoked") {
      return problem("not_pending", `This invitation was ${status}; invite the address again instead.`);
    }
    const { token, hash } = newLinkToken();
    const expiresAt = new Date(Date.now() + INVITATION_TTL_MS);
    await trx("invitations").where({ id: row.id }).update({ token_hash: hash, expires_at: expiresAt, sent_at: new Date() });
    const role = row.role;
    await queueMail(
      invitationMail({ to: row.email, token, groupName: await groupName(groupId, trx), role, inviterName: user.displayName, expiresAt }),
      trx,
    );
    await recordAudit(
      { groupId, userId: user.id, action: "invitation.resend", entityType: "invitation", entityId: row.id, detail: { email: row.email } },
      trx,
    );
    return { ok: true as const };
  });
}

/** Withdraws an invitation so its link no longer works (lead only). */
export async function revokeInvitation(groupId: number, invitationId: number): Promise<TeamResult> {
  const { user } = await requireRole(groupId, "lead");
  return db.transaction(async (trx) => {
    const row = await lockInvitation(trx, groupId, invitationId);
    const status = invitationStatus(row);
    if (status === "accepted" || status === "revoked") return problem("not_pending", `This invitation was already ${status}.`);
    await trx("invitations").where({ id: row.id }).update({ revoked_at: new Date() });
    await recordAudit(
      { groupId, userId: user.id, action: "invitation.revoke", entityType: "invitation", entityId: row.id, detail: { email: row.email } },
      trx,
    );
    return { ok: true as const };
  });
}

type LockedMembers = Array<{ user_id: string; role: Role; email: string }>;

// Locks every membership of the group, so two leads demoting each other cannot both succeed.
async function lockMembers(trx: Knex.Transaction, groupId: number): Promise<LockedMembers> {
  return trx("memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .where("m.group_id", groupId)
    .forUpdate("m")
    .select<LockedMembers>("m.user_id", "m.role", "u.email");
}

const LAST_LEAD = "A group needs at least one lead. Make another member lead first.";

/** Changes a member's role; the last lead cannot be demoted (lead only). */
export async function changeMemberRole(groupId: number, userId: string, role: Role): Promise<TeamResult> {
  const { user } = await requireRole(groupId, "lead");
  return db.transaction(async (trx) => {
    const members = await lockMembers(trx, groupId);
    const target = members.find((m) => m.user_id === userId);
    if (!target) return problem("not_found", "This person is not a member of the group.");
    if (target.role === role) return { ok: true as const };
    if (target.role === "lead" && members.filter((m) => m.role === "lead").length === 1) return problem("last_lead", LAST_LEAD);
    await trx("memberships").where({ group_id: groupId, user_id: userId }).update({ role });
    await recordAudit(
      { groupId, userId: user.id, action: "member.role_change", entityType: "membership", entityId: userId, detail: { email: target.email, from: target.role, to: role } },
      trx,
    );
    return { ok: true as const };
  });
}

/** Removes a member from the group; the last lead cannot be removed (lead only). */
export async function removeMember(groupId: number, userId: string): Promise<TeamResult> {
  const { user } = await requireRole(groupId, "lead");
  return db.transaction(async (trx) => {
    const members = await lockMembers(trx, groupId);
    const target = members.find((m) => m.user_id === userId);
    if (!target) return problem("not_found", "This person is not a member of the group.");
    if (target.role === "lead" && members.filter((m) => m.role === "lead").length === 1) return problem("last_lead", LAST_LEAD);
    await trx("memberships").where({ group_id: groupId, user_id: userId }).delete();
    await recordAudit(
      { groupId, userId: user.id, action: "member.remove", entityType: "membership", entityId: userId, detail: { email: target.email, role: target.role } },
      trx,
    );
    return { ok: true as const };
  });
}

export type AcceptResult =
  | { ok: true; userId: string; groupId: number; newAccount: boolean }
  | (TeamActionState & { ok: false });

const REFUSED: AcceptResult = { ok: false, message: "This invitation link is not valid any more. Ask the group's lead for a new one." };

/**
 * Accepts an invitation. Signed in as the invited address: joins. Not signed in: an existing
 * account proves itself with its password, a new person chooses name and password. The token
 * works once: the invitation row is locked and marked accepted in the same transaction.
 */
export async function acceptInvitation(
  token: string,
  fields: Record<string, unknown>,
  current: SessionUser | null,
): Promise<AcceptResult> {
  if (!isLinkTokenShape(token)) return REFUSED;
  const tokenHash = hashLinkToken(token);
  const peek = await db("invitations").where({ token_hash: tokenHash }).first();
  if (!peek || invitationStatus(peek) !== "pending") return REFUSED;

  const existing = await db("users")
    .where({ email: peek.email })
    .first<{ id: string; password_hash: string } | undefined>("id", "password_hash");
  let newUser: { id: string; displayName: string; passwordHash: string } | null = null;
  if (current) {
    if (current.email !== peek.email) {
      return { ok: false, message: `This invitation is for ${peek.email}. Sign out first, then open the link again.` };
    }
  } else if (existing) {
    const parsed = acceptExistingSchema.safeParse(fields);
    if (!parsed.success) return { ok: false, message: "Enter your password.", fieldErrors: { password: ["Enter your password."] } };
    if (!(await verifyPassword(existing.password_hash, parsed.data.password))) {
      return { ok: false, message: "The password is not right.", fieldErrors: { password: ["The password is not right."] } };
    }
  } else {
    const parsed = acceptNewSchema.safeParse(fields);
    if (!parsed.success) {
      const fieldErrors: Record<string, string[]> = {};
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? "form");
        (fieldErrors[key] ??= []).push(issue.message);
      }
      return { ok: false, message: "Check the fields marked below.", fieldErrors };
    }
    newUser = { id: generateIdFromEntropySize(10), displayName: parsed.data.displayName, passwordHash: await hashPassword(parsed.data.password) };
  }

  return db.transaction(async (trx): Promise<AcceptResult> => {
    const row = await trx("invitations").where({ token_hash: tokenHash }).forUpdate().first();
    // Re-checked under the lock: a second click or a parallel request finds it accepted.
    if (!row || invitationStatus(row) !== "pending") return REFUSED;
    let userId: string;
    if (current) userId = current.id;
    else if (existing) userId = existing.id;
    else if (newUser) {
      userId = newUser.id;
      await trx("users").insert({ id: userId, email: row.email, display_name: newUser.displayName, password_hash: newUser.passwordHash });
      await recordAudit({ groupId: null, userId, action: "user.sign_up", entityType: "user", entityId: userId, detail: { via: "invitation" } }, trx);
    } else throw new Error("unreachable");
    await trx("memberships").insert({ user_id: userId, group_id: row.group_id, role: row.role }).onConflict(["user_id", "group_id"]).ignore();
    await trx("invitations").where({ id: row.id }).update({ accepted_at: new Date(), accepted_by: userId });
    await recordAudit(
      { groupId: row.group_id, userId, action: "invitation.accept", entityType: "invitation", entityId: row.id, detail: { email: row.email, role: row.role } },
      trx,
    );
    return { ok: true, userId, groupId: row.group_id, newAccount: newUser !== null };
  });
}
