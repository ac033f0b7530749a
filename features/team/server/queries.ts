import "server-only";
import { requireRole } from "@/lib/auth/session";
import { isRole, type Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import type { InvitationRow } from "@/lib/db/tables";
import type { Invitation, InvitationStatus, Member } from "@/features/team/schemas";

export function invitationStatus(row: Pick<InvitationRow, "accepted_at" | "revoked_at" | "expires_at">, now = new Date()): InvitationStatus {
  if (row.accepted_at) return "accepted";
  if (row.revoked_at) return "revoked";
  if (row.expires_at.getTime() <= now.getTime()) return "expired";
  return "pending";
}

function asRole(v: string): Role {
  if (!isRole(v)) throw new Error(`unexpected role ${v}`);
  return v;
}

/** Members of a group, leads first; any member may read it. */
export async function listMembers(groupId: number): Promise<Member[]> {
  await requireRole(groupId, "viewer");
  const rows = await db("memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .where("m.group_id", groupId)
    .orderByRaw("FIELD(m.role, 'lead', 'analyst', 'viewer')")
    .orderBy("u.display_name")
    .select<Array<{ id: string; email: string; display_name: string; role: string; created_at: Date }>>(
      "u.id",
      "u.email",
      "u.display_name",
      "m.role",
      "m.created_at",
    );
  return rows.map((r) => ({
    userId: r.id,
    email: r.email,
    displayName: r.display_name,
    role: asRole(r.role),
    joinedAt: r.created_at.toISOString(),
  }));
}

/** Invitations of a group that are still open or ended in the last 30 days (lead only). */
export async function listInvitations(groupId: number): Promise<Invitation[]> {
  await requireRole(groupId, "lead");
  const rows = await db("invitations as i")
    .leftJoin("users as u", "u.id", "i.invited_by")
    .where("i.group_id", groupId)
    .andWhere((q) => {
      q.whereNull("i.accepted_at").orWhere("i.accepted_at", ">", db.raw("NOW(3) - INTERVAL 30 DAY"));
    })
    .orderBy("i.created_at", "desc")
    .select<Array<InvitationRow & { inviter: string | null }>>("i.*", { inviter: "u.display_name" });
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: asRole(r.role),
    status: invitationStatus(r),
    invitedBy: r.inviter,
    sentAt: r.sent_at.toISOString(),
    expiresAt: r.expires_at.toISOString(),
  }));
}

export type InvitationView =
  | { state: "unknown" }
  | {
      state: InvitationStatus;
      groupName: string;
      email: string;
      role: Role;
      /** an account with the invited address exists */
      accountExists: boolean;
    };

/** What the accept page shows for a link secret's hash (no session needed). */
export async function viewInvitationByHash(tokenHash: string): Promise<InvitationView> {
  const row = await db("invitations as i")
    .join("research_groups as g", "g.id", "i.group_id")
    .where("i.token_hash", tokenHash)
    .first<(InvitationRow & { group_name: string }) | undefined>("i.*", { group_name: "g.name" });
  if (!row) return { state: "unknown" };
  const account = await db("users").where({ email: row.email }).first<{ id: string } | undefined>("id");
  return {
    state: invitationStatus(row),
    groupName: row.group_name,
    email: row.email,
    role: asRole(row.role),
    accountExists: Boolean(account),
  };
}

