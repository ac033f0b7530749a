import type { Metadata } from "next";
import Link from "next/link";
import { getActiveGroup, requireSession } from "@/lib/auth/session";
import { roleAtLeast } from "@/lib/auth/roles";
import { env } from "@/lib/env";
import { PageHeader } from "@/lib/ui/page-header";
import { InvitationList } from "@/features/team/components/invitation-list";
import { InviteForm } from "@/features/team/components/invite-form";
import { MemberList } from "@/features/team/components/member-list";
import {
  inviteAction,
  removeMemberAction,
  resendInvitationAction,
  revokeInvitationAction,
  setMemberRoleAction,
} from "@/features/team/server/actions";
import { listInvitations, listMembers } from "@/features/team/server/queries";

export const metadata: Metadata = { title: "Team" };

export default async function TeamPage() {
  const { user } = await requireSession();
  const active = await getActiveGroup();
  if (!active) return <PageHeader title="Team" description="You are not a member of any research group yet." />;
  const canManage = roleAtLeast(active.role, "lead");
  const [members, invitations] = await Promise.all([
    listMembers(active.groupId),
    canManage ? listInvitations(active.groupId) : Promise.resolve([]),
  ]);

  return (
    <>
      <PageHeader
        title="Team"
        eyebrow={active.groupName}
        description={
          canManage
            ? "Members of this group and their roles. Invite people by e-mail; every change is kept in the audit log."
            : "Members of this group and their roles. Only a lead can invite people or change roles."
        }
        actions={
          canManage && env.DEMO_MODE ? (
            <Link href="/mail" className="btn-quiet">
              Caught mail
            </Link>
          ) : null
        }
      />
      <div className="space-y-10">
        {canManage ? (
          <section className="card p-5">
            <InviteForm action={inviteAction.bind(null, active.groupId)} />
          </section>
        ) : null}
        <section aria-labelledby="members-title" className="space-y-3">
          <h2 id="members-title" className="text-base font-semibold">
            Members ({members.length})
          </h2>
          <MemberList
            members={members}
            currentUserId={user.id}
            canManage={canManage}
            changeRole={setMemberRoleAction.bind(null, active.groupId)}
            remove={removeMemberAction.bind(null, active.groupId)}
          />
        </section>
        {canManage ? (
          <section aria-labelledby="invitations-title" className="space-y-3">
            <h2 id="invitations-title" className="text-base font-semibold">
              Invitations
            </h2>
            <InvitationList
              invitations={invitations}
              resend={resendInvitationAction.bind(null, active.groupId)}
              revoke={revokeInvitationAction.bind(null, active.groupId)}
            />
          </section>
        ) : null}
      </div>
    </>
  );
}
