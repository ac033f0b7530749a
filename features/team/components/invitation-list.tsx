"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { FormMessage } from "@/lib/ui/field";
import type { Invitation, TeamActionState } from "@/features/team/schemas";

type Props = {
  invitations: Invitation[];
  resend: (invitationId: number) => Promise<TeamActionState>;
  revoke: (invitationId: number) => Promise<TeamActionState>;
};

const STATUS_WORDS: Record<Invitation["status"], string> = {
  pending: "waiting",
  expired: "expired",
  accepted: "accepted",
  revoked: "revoked",
};

/** Open and recent invitations with resend and revoke. */
export function InvitationList({ invitations, resend, revoke }: Props) {
  const [message, setMessage] = useState<TeamActionState | null>(null);
  const [pending, startTransition] = useTransition();
  const router = useRouter();
  if (invitations.length === 0) return <p className="text-sm text-ink-muted">No open invitations.</p>;

  function run(work: () => Promise<TeamActionState>) {
    startTransition(async () => {
      setMessage(await work());
      router.refresh();
    });
  }

  return (
    <div className="space-y-3">
      {message ? <FormMessage tone={message.ok ? "info" : "error"}>{message.message}</FormMessage> : null}
      <ul className="card divide-y divide-line">
        {invitations.map((i) => (
          <li key={i.id} className="flex flex-wrap items-center justify-between gap-3 px-4 py-3 text-sm">
            <span className="min-w-0">
              <span className="block font-mono text-xs">{i.email}</span>
              <span className="block text-xs text-ink-muted">
                {i.role} · {STATUS_WORDS[i.status]}
                {i.status === "pending" ? ` until ${new Date(i.expiresAt).toUTCString()}` : ""}
                {i.invitedBy ? ` · invited by ${i.invitedBy}` : ""}
              </span>
            </span>
            {i.status === "pending" || i.status === "expired" ? (
              <span className="flex gap-2">
                <button type="button" className="btn-quiet py-1" disabled={pending} onClick={() => run(() => resend(i.id))}>
                  Resend
                </button>
                <button
                  type="button"
                  className="btn-quiet py-1 text-red-700 dark:text-red-300"
                  disabled={pending}
                  onClick={() => run(() => revoke(i.id))}
                >
                  Revoke
                </button>
              </span>
            ) : null}
          </li>
        ))}
      </ul>
    </div>
  );
}
