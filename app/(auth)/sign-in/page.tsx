import type { Metadata } from "next";
import Link from "next/link";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "@/lib/demo/scenario";
import { env } from "@/lib/env";
import { SignInForm, type DemoAccount } from "@/features/auth/components/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

const ROLE_NOTE = {
  lead: "manages sites and members",
  analyst: "imports data and reviews evenings",
  viewer: "browses and exports",
} as const;

const demoAccounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({
  email: a.email,
  role: a.role,
  description: ROLE_NOTE[a.role],
}));

export default function SignInPage() {
  return (
    <>
      <h1 className="text-xl font-semibold tracking-tight">Sign in</h1>
      <p className="mt-1 mb-6 text-sm text-ink-muted">Evening labels for your flux-tower sites.</p>
      <SignInForm demo={env.DEMO_MODE ? { accounts: demoAccounts, password: DEMO_PASSWORD } : null} />
      <p className="mt-4 text-center text-sm text-ink-muted">
        <Link href="/reset-password" className="underline-offset-2 hover:underline">
          Forgot your password?
        </Link>
      </p>
    </>
  );
}
