"use client";

import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import type { RecoveryState } from "@/features/recovery/schemas";

type Props = { action: (prev: RecoveryState, formData: FormData) => Promise<RecoveryState> };

/** "Choose a new password" behind a reset link. */
export function ResetPasswordForm({ action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  const [password, setPassword] = useState("");
  const [confirm, setConfirm] = useState("");
  return (
    <form action={formAction} noValidate className="space-y-4">
      {!state.ok ? <FormMessage tone="error">{state.message}</FormMessage> : null}
      <Field
        name="password"
        label="New password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters. Every other session of your account is signed out."
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        errors={state.fieldErrors?.password}
      />
      <Field
        name="confirm"
        label="Repeat the new password"
        type="password"
        autoComplete="new-password"
        value={confirm}
        onChange={(e) => setConfirm(e.target.value)}
        errors={state.fieldErrors?.confirm}
      />
      <button type="submit" className="btn-primary w-full" disabled={pending}>
        {pending ? "Saving…" : "Set the new password"}
      </button>
    </form>
  );
}
