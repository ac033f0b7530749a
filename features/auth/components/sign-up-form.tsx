"use client";

import Link from "next/link";
import { useActionState, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import { signUp } from "@/features/auth/server/actions";
import type { ActionState } from "@/features/auth/schemas";

const EMPTY = { displayName: "", email: "", password: "", groupName: "" };

/** Sign-up form: a person and the research group they will lead. */
export function SignUpForm() {
  const [state, formAction, pending] = useActionState<ActionState, FormData>(signUp, { ok: true });
  // Controlled so a failed attempt keeps what was typed.
  const [values, setValues] = useState(EMPTY);
  const bind = (name: keyof typeof EMPTY) => ({
    name,
    value: values[name],
    onChange: (e: React.ChangeEvent<HTMLInputElement>) =>
      setValues((v) => ({ ...v, [name]: e.target.value })),
    errors: state.fieldErrors?.[name],
  });

  return (
    <form action={formAction} noValidate className="space-y-4">
      {!state.ok && state.message ? <FormMessage tone="error">{state.message}</FormMessage> : null}
      <Field label="Your name" autoComplete="name" required {...bind("displayName")} />
      <Field label="E-mail address" type="email" autoComplete="email" required {...bind("email")} />
      <Field
        label="Password"
        type="password"
        autoComplete="new-password"
        required
        hint="At least 10 characters."
        {...bind("password")}
      />
      <Field
        label="Research group"
        required
        hint="A new group for your sites; you become its lead."
        {...bind("groupName")}
      />
      <button type="submit" className="btn-primary w-full" disabled={pending}>
        {pending ? "Creating…" : "Create account"}
      </button>
      <p className="text-center text-sm text-ink-muted">
        Already have an account?{" "}
        <Link
          href="/sign-in"
          className="font-medium text-dusk-700 underline-offset-2 hover:underline dark:text-dusk-200"
        >
          Sign in
        </Link>
      </p>
    </form>
  );
}
