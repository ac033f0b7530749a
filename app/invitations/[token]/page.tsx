import type { Metadata } from "next";
import Link from "next/link";
import { hashLinkToken, isLinkTokenShape } from "@/lib/auth/link-token";
import { getCurrentSession } from "@/lib/auth/session";
import { LabelCaution } from "@/lib/ui/caution";
import { FormMessage } from "@/lib/ui/field";
import { Brand } from "@/features/shell/components/brand";
import { AcceptForm } from "@/features/team/components/accept-form";
import { acceptInvitationAction } from "@/features/team/server/actions";
import { viewInvitationByHash, type InvitationView } from "@/features/team/server/queries";

export const metadata: Metadata = { title: "Accept invitation", robots: { index: false } };

const ENDED: Record<string, string> = {
  unknown: "This invitation link is not valid. It may have been replaced by a newer one.",
  expired: "This invitation has expired. Ask the group's lead to send it again.",
  accepted: "This invitation was used already. Sign in to reach the group.",
  revoked: "This invitation was withdrawn by the group's lead.",
};

// Outside the (auth) group on purpose: someone already signed in may accept an invitation to another group.
export default async function AcceptInvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const view: InvitationView = isLinkTokenShape(token) ? await viewInvitationByHash(hashLinkToken(token)) : { state: "unknown" };
  const current = await getCurrentSession();

  let body;
  if (view.state !== "pending") {
    body = (
      <div className="space-y-4">
        <FormMessage tone="error">{ENDED[view.state]}</FormMessage>
        <Link href="/sign-in" className="btn-quiet w-full">
          Go to sign in
        </Link>
      </div>
    );
  } else if (current && current.user.email !== view.email) {
    body = (
      <FormMessage tone="error">
        You are signed in as {current.user.email}, but this invitation is for {view.email}. Sign out, then open the link again.
      </FormMessage>
    );
  } else {
    const mode = current ? "signed-in" : view.accountExists ? "existing" : "new";
    body = <AcceptForm mode={mode} email={view.email} action={acceptInvitationAction.bind(null, token)} />;
  }

  return (
    <div className="flex min-h-dvh flex-col items-center justify-center px-4 py-10">
      <main id="main" className="w-full max-w-md">
        <div className="mb-6 flex justify-center">
          <Brand href="/sign-in" />
        </div>
        <div className="card p-6 sm:p-8">
          <h1 className="text-xl font-semibold tracking-tight">Accept invitation</h1>
          {view.state === "pending" ? (
            <p className="mt-1 mb-6 text-sm text-ink-muted">
              Join <strong className="text-ink">{view.groupName}</strong> as {view.role}.
            </p>
          ) : (
            <div className="mb-4" />
          )}
          {body}
        </div>
        <LabelCaution className="mt-6 px-1" />
      </main>
    </div>
  );
}
