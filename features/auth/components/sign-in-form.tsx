"use client";

import Link from "next/link";
import { useActionState, useRef, useState } from "react";
import { Field, FormMessage } from "@/lib/ui/field";
import { signIn } from "@/features/auth/server/actions";
import type { ActionState } from "@/features/auth/schemas";

export type DemoAccount = { email: string; role: string; description: string };

/**
 * Sign-in form. Inputs are controlled so that a failed attempt keeps what was typed
 * (React resets uncontrolled fields after a form action) and so a demo account fills in one click.
 */
export function SignInForm({ demo }: { demo: { accounts: DemoAccount[]; password: string } | null }) {
  const [state, formAction, pending] = useActionState<ActionState, FormData>(signIn, { ok: true });
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  const submitRef = useRef<HTMLButtonElement>(null);

  function fill(account: DemoAccount) {
    if (!demo) return;
    setEmail(account.email);
    setPassword(demo.password);
    submitRef.current?.focus();
  }

  return (
    <div className="space-y-6">
      <form action={formAction} noValidate className="space-y-4">
        {!state.ok && state.message ? <FormMessage tone="error">{state.message}</FormMessage> : null}
        <Field
          name="email"
          label="E-mail address"
          type="email"
          autoComplete="email"
          required
          value={email}
          onChange={(e) => setEmail(e.target.value)}
          errors={state.fieldErrors?.email}
        />
        <Field
          name="password"
          label="Password"
          type="password"
          autoComplete="current-password"
          required
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          errors={state.fieldErrors?.password}
        />
        <button ref={submitRef} type="submit" className="btn-primary w-full" disabled={pending}>
          {pending ? "Signing in…" : "Sign in"}
        </button>
        <p className="text-center text-sm text-ink-muted">
          New here?{" "}
          <Link
            href="/sign-up"
            className="font-medium text-dusk-700 underline-offset-2 hover:underline dark:text-dusk-200"
          >
            Create an account and a group
          </Link>
        </p>
      </form>

      {demo ? (
        <section
          aria-labelledby="demo-title"
          className="rounded-xl border border-dashed border-dusk-300 p-4 dark:border-dusk-600"
        >
          <h2 id="demo-title" className="text-sm font-semibold">
            Demo scenario accounts
          </h2>
          <p className="mt-1 text-xs text-ink-muted">
            Synthetic data for trying Gloaming. Password for all three:{" "}
            <code className="rounded bg-surface-sunken px-1 py-0.5 font-mono">{demo.password}</code>
          </p>
          <ul className="mt-3 space-y-2">
            {demo.accounts.map((a) => (
              <li key={a.email}>
                <button
                  type="button"
                  onClick={() => fill(a)}
                  className="flex w-full items-center justify-between gap-3 rounded-lg border border-line bg-surface-raised px-3 py-2 text-left hover:bg-surface-sunken"
                  aria-label={`Fill in the demo ${a.role}: ${a.email}`}
                >
                  <span className="min-w-0">
                    <span className="block truncate font-mono text-xs text-ink">{a.email}</span>
                    <span className="block text-xs text-ink-muted">{a.description}</span>
                  </span>
                  <span className="shrink-0 rounded-full bg-dusk-100 px-2 py-0.5 text-xs font-medium text-dusk-800 dark:bg-dusk-800 dark:text-dusk-100">
                    {a.role}
                  </span>
                </button>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}
