"use client";

import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import type { TeamActionState } from "@/features/team/schemas";

type Props = { action: (prev: TeamActionState, formData: FormData) => Promise<TeamActionState> };

/** "Invite someone": an address and a role; the mail goes out through the outbox. */
export function InviteForm({ action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  const [email, setEmail] = useState("");
  const [role, setRole] = useState("analyst");
  return (
    <form
      action={formAction}
      noValidate
      className="space-y-4"
      aria-labelledby="invite-title"
    >
      <h2 id="invite-title" className="text-base font-semibold">
        Invite someone
      </h2>
      <FormMessage tone={state.ok ? "info" : "error"}>{state.message}</FormMessage>
      <div className="grid gap-4 sm:grid-cols-[1fr_12rem_auto] sm:items-end">
        <Field
          name="email"
          label="E-mail address"
          type="email"
          autoComplete="off"
          value={email}
          onChange={(e) => setEmail(e.target.value)}
          errors={state.fieldErrors?.email}
        />
        <div className="space-y-1.5">
          <label htmlFor="invite-role" className="block text-sm font-medium text-ink">
            Role
          </label>
          <select id="invite-role" name="role" className="field-input" value={role} onChange={(e) => setRole(e.target.value)}>
            <option value="viewer">viewer</option>
            <option value="analyst">analyst</option>
            <option value="lead">lead</option>
          </select>
        </div>
        <button type="submit" className="btn-primary" disabled={pending}>
          {pending ? "Sending…" : "Send invitation"}
        </button>
      </div>
      <p className="text-xs text-ink-muted">The link in the mail works once and expires after 7 days.</p>
    </form>
  );
}
