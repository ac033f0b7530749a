"use client";

import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import type { TokenFormState } from "@/features/account/schemas";

type Props = { action: (prev: TokenFormState, formData: FormData) => Promise<TokenFormState> };

/** "New token": a name in, the secret out - shown here once, with a copy button. */
export function TokenCreateForm({ action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  // React resets the form after the action; the secret stays until the next submit.
  const created = state.created;
  const [copiedSecret, setCopiedSecret] = useState<string | null>(null);
  const copied = created !== undefined && copiedSecret === created.secret;

  async function copy() {
    if (!created) return;
    try {
      await navigator.clipboard.writeText(created.secret);
      setCopiedSecret(created.secret);
    } catch {
      setCopiedSecret(null);
    }
  }

  return (
    <div className="space-y-4">
      <form action={formAction} noValidate className="space-y-4" aria-labelledby="new-token-title">
        <h2 id="new-token-title" className="text-base font-semibold">
          New token
        </h2>
        {!state.ok && state.message ? <FormMessage tone="error">{state.message}</FormMessage> : null}
        <div className="grid gap-4 sm:grid-cols-[1fr_auto] sm:items-end">
          <Field
            name="name"
            label="Name"
            hint="What will use it, e.g. “logger PC, north tower”."
            maxLength={80}
            autoComplete="off"
            errors={state.fieldErrors?.name}
          />
          <button type="submit" className="btn-primary" disabled={pending}>
            {pending ? "Creating…" : "Create token"}
          </button>
        </div>
      </form>

      {created ? (
        <div role="status" className="space-y-2 rounded-lg border border-dusk-200 bg-dusk-50 p-4 dark:border-dusk-700 dark:bg-dusk-900/60">
          <p className="text-sm font-medium text-ink">
            Token “{created.name}” created. Copy it now: it is shown only this once and cannot be recovered.
          </p>
          <div className="flex flex-col gap-2 sm:flex-row">
            <label htmlFor="new-token-secret" className="sr-only">
              Token secret
            </label>
            <input
              id="new-token-secret"
              readOnly
              value={created.secret}
              onFocus={(e) => e.currentTarget.select()}
              className="field-input font-mono text-xs"
              data-testid="new-token-secret"
            />
            <button type="button" className="btn-quiet shrink-0" onClick={() => void copy()}>
              {copied ? "Copied" : "Copy"}
            </button>
          </div>
        </div>
      ) : null}
    </div>
  );
}
