"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { flattenError } from "zod";
import { AuthError, getCurrentSession, startSession, writeActiveGroupCookie } from "@/lib/auth/session";
import {
  groupIdSchema,
  invitationIdSchema,
  inviteSchema,
  roleChangeSchema,
  userIdSchema,
  type TeamActionState,
} from "@/features/team/schemas";
import {
  acceptInvitation,
  changeMemberRole,
  inviteMember,
  removeMember,
  resendInvitation,
  revokeInvitation,
  type TeamResult,
} from "@/features/team/server/mutations";

/*
 * Team screen actions. Bound arguments (group, invitation, person) come from the client
 * too, so they are validated like form fields; every mutation checks the role itself.
 */

function authProblem(err: unknown): TeamActionState {
  if (err instanceof AuthError) {
    if (err.code === "unauthenticated") redirect("/sign-in");
    if (err.code === "forbidden") return { ok: false, message: "Only a lead of this group can manage its members." };
    return { ok: false, message: "This group or person is not in one of your groups." };
  }
  throw err;
}

async function run(work: () => Promise<TeamResult>, done: string): Promise<TeamActionState> {
  let result: TeamResult;
  try {
    result = await work();
  } catch (err) {
    return authProblem(err);
  }
  if (!result.ok) return { ok: false, message: result.message };
  revalidatePath("/team");
  return { ok: true, message: done };
}

function text(formData: FormData, key: string): string | undefined {
  const v = formData.get(key);
  return typeof v === "string" ? v : undefined;
}

/** Form action "Invite": bind the group id, inviteAction.bind(null, groupId). */
export async function inviteAction(groupId: number, _prev: TeamActionState, formData: FormData): Promise<TeamActionState> {
  const group = groupIdSchema.safeParse(groupId);
  if (!group.success) return { ok: false, message: "The form lost its group; reload the page." };
  const parsed = inviteSchema.safeParse({ email: text(formData, "email"), role: text(formData, "role") });
  if (!parsed.success) {
    return { ok: false, message: "Check the fields marked below.", fieldErrors: flattenError(parsed.error).fieldErrors };
  }
  return run(() => inviteMember(group.data, parsed.data), `Invitation sent to ${parsed.data.email}.`);
}

/** Sends a new link for an invitation. */
export async function resendInvitationAction(groupId: number, invitationId: number): Promise<TeamActionState> {
  const g = groupIdSchema.safeParse(groupId);
  const i = invitationIdSchema.safeParse(invitationId);
  if (!g.success || !i.success) return { ok: false, message: "Unknown invitation." };
  return run(() => resendInvitation(g.data, i.data), "A new link was sent.");
}

/** Withdraws an invitation. */
export async function revokeInvitationAction(groupId: number, invitationId: number): Promise<TeamActionState> {
  const g = groupIdSchema.safeParse(groupId);
  const i = invitationIdSchema.safeParse(invitationId);
  if (!g.success || !i.success) return { ok: false, message: "Unknown invitation." };
  return run(() => revokeInvitation(g.data, i.data), "Invitation revoked.");
}

/** Form action of a member's role selector: changeRoleAction.bind(null, groupId, userId). */
export async function changeRoleAction(
  groupId: number,
  userId: string,
  _prev: TeamActionState,
  formData: FormData,
): Promise<TeamActionState> {
  const g = groupIdSchema.safeParse(groupId);
  const u = userIdSchema.safeParse(userId);
  if (!g.success || !u.success) return { ok: false, message: "Unknown member." };
  const parsed = roleChangeSchema.safeParse({ role: text(formData, "role") });
  if (!parsed.success) return { ok: false, message: "Choose lead, analyst or viewer." };
  return run(() => changeMemberRole(g.data, u.data, parsed.data.role), "Role changed.");
}

/** Removes a member from the group. */
export async function removeMemberAction(groupId: number, userId: string): Promise<TeamActionState> {
  const g = groupIdSchema.safeParse(groupId);
  const u = userIdSchema.safeParse(userId);
  if (!g.success || !u.success) return { ok: false, message: "Unknown member." };
  return run(() => removeMember(g.data, u.data), "Member removed.");
}

/** Form action of the accept page: acceptInvitationAction.bind(null, token). Redirects to /sites on success. */
export async function acceptInvitationAction(token: string, _prev: TeamActionState, formData: FormData): Promise<TeamActionState> {
  if (typeof token !== "string") return { ok: false, message: "This invitation link is not valid." };
  const current = await getCurrentSession();
  const fields: Record<string, unknown> = {};
  for (const [k, v] of formData.entries()) if (typeof v === "string") fields[k] = v;
  const result = await acceptInvitation(token, fields, current?.user ?? null);
  if (!result.ok) return result;
  if (!current) await startSession(result.userId);
  await writeActiveGroupCookie(result.groupId);
  redirect("/sites");
}

/** The role selector of the members table: setMemberRoleAction.bind(null, groupId). */
export async function setMemberRoleAction(groupId: number, userId: string, role: string): Promise<TeamActionState> {
  const g = groupIdSchema.safeParse(groupId);
  const u = userIdSchema.safeParse(userId);
  const r = roleChangeSchema.safeParse({ role });
  if (!g.success || !u.success) return { ok: false, message: "Unknown member." };
  if (!r.success) return { ok: false, message: "Choose lead, analyst or viewer." };
  return run(() => changeMemberRole(g.data, u.data, r.data.role), "Role changed.");
}
