import type { Metadata } from "next";
import { env } from "@/lib/env";
import { SignInForm, type DemoAccount } from "@/features/auth/components/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

// The demo scenario's invented accounts (seeded by the platform's demo seed).
const DEMO_ACCOUNTS: DemoAccount[] = [
  { email: "lead@demo.gloaming.test", role: "lead", description: "manages sites and members" },
  { email: "analyst@demo.gloaming.test", role: "analyst", description: "imports data and reviews evenings" },
  { email: "viewer@demo.gloaming.test", role: "viewer", description: "browses and exports" },
];

export default function SignInPage() {
  return (
    <>
      <h1 className="text-xl font-semibold tracking-tight">Sign in</h1>
      <p className="mt-1 mb-6 text-sm text-ink-muted">Evening labels for your flux-tower sites.</p>
      <SignInForm demo={env.DEMO_MODE ? { accounts: DEMO_ACCOUNTS, password: "gloaming-demo" } : null} />
    </>
  );
}
