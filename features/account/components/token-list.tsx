"use client";

import { useActionState } from "react";
import { FormMessage } from "@/lib/ui/field";
import type { RevokeState, TokenView } from "@/features/account/schemas";

type Props = {
  tokens: TokenView[];
  revoke: (prev: RevokeState, formData: FormData) => Promise<RevokeState>;
};

const when = (iso: string | null) =>
  iso ? new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" }) : "never";

/** The person's tokens with when each was made and last used; live ones can be revoked. */
export function TokenList({ tokens, revoke }: Props) {
  const [state, formAction, pending] = useActionState(revoke, { ok: true });
  if (tokens.length === 0) return <p className="text-sm text-ink-muted">No tokens yet.</p>;
  return (
    <div className="space-y-3">
      <FormMessage tone={state.ok ? "info" : "error"}>{state.message}</FormMessage>
      <ul className="divide-y divide-line rounded-lg border border-line">
        {tokens.map((t) => (
          <li key={t.id} className="flex flex-col gap-2 px-4 py-3 sm:flex-row sm:items-center sm:justify-between">
            <div className="min-w-0">
              <p className="truncate font-medium text-ink">
                {t.name}
                {t.revokedAt ? <span className="ml-2 text-xs font-normal text-ink-muted">revoked {when(t.revokedAt)}</span> : null}
              </p>
              <p className="text-xs text-ink-muted">
                created {when(t.createdAt)} · last used {when(t.lastUsedAt)}
              </p>
            </div>
            {t.revokedAt ? null : (
              <form
                action={formAction}
                onSubmit={(e) => {
                  if (!window.confirm(`Revoke “${t.name}”? Scripts using it will be refused.`)) e.preventDefault();
                }}
              >
                <input type="hidden" name="tokenId" value={t.id} />
                <button type="submit" className="btn-quiet text-sm" disabled={pending} aria-label={`Revoke ${t.name}`}>
                  Revoke
                </button>
              </form>
            )}
          </li>
        ))}
      </ul>
    </div>
  );
}
