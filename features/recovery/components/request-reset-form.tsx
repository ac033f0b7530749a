"use client";

import Link from "next/link";
import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import type { RecoveryState } from "@/features/recovery/schemas";

type Props = { action: (prev: RecoveryState, formData: FormData) => Promise<RecoveryState> };

/** "Forgot your password?": asks for the address and always gives the same answer. */
export function RequestResetForm({ action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  const [email, setEmail] = useState("");
  return (
    <form action={formAction} noValidate className="space-y-4">
      <FormMessage tone={state.ok ? "info" : "error"}>{state.message}</FormMessage>
      <Field
        name="email"
        label="E-mail address"
        type="email"
        autoComplete="email"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        errors={state.fieldErrors?.email}
      />
      <button type="submit" className="btn-primary w-full" disabled={pending}>
        {pending ? "Sending…" : "Send a reset link"}
      </button>
      <p className="text-center text-sm text-ink-muted">
        <Link href="/sign-in" className="font-medium text-dusk-700 underline-offset-2 hover:underline dark:text-dusk-200">
          Back to sign in
        </Link>
      </p>
    </form>
  );
}
