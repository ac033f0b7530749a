"use client";

import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import type { TeamActionState } from "@/features/team/schemas";

type Props = {
  /** "new": choose a name and password; "existing": the account's password; "signed-in": one click */
  mode: "new" | "existing" | "signed-in";
  email: string;
  action: (prev: TeamActionState, formData: FormData) => Promise<TeamActionState>;
};

/** Accepting an invitation. Fields are controlled so a failed attempt keeps what was typed. */
export function AcceptForm({ mode, email, action }: Props) {
  const [state, formAction, pending] = useActionState(action, { ok: true });
  const [displayName, setDisplayName] = useState("");
  const [password, setPassword] = useState("");
  return (
    <form action={formAction} noValidate className="space-y-4">
      {!state.ok ? <FormMessage tone="error">{state.message}</FormMessage> : null}
      <p className="text-sm">
        Invited address: <span className="font-mono text-xs">{email}</span>
      </p>
      {mode === "new" ? (
        <Field
          name="displayName"
          label="Your name"
          autoComplete="name"
          value={displayName}
          onChange={(e) => setDisplayName(e.target.value)}
          errors={state.fieldErrors?.displayName}
        />
      ) : null}
      {mode !== "signed-in" ? (
        <Field
          name="password"
          label={mode === "new" ? "Choose a password" : "Your password"}
          type="password"
          autoComplete={mode === "new" ? "new-password" : "current-password"}
          hint={mode === "new" ? "At least 10 characters." : "You already have an account with this address."}
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          errors={state.fieldErrors?.password}
        />
      ) : null}
      <button type="submit" className="btn-primary w-full" disabled={pending}>
        {pending ? "Joining…" : mode === "new" ? "Create account and join" : "Join the group"}
      </button>
    </form>
  );
}
