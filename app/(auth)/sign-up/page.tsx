import type { Metadata } from "next";
import { SignUpForm } from "@/features/auth/components/sign-up-form";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <>
      <h1 className="text-xl font-semibold tracking-tight">Create an account</h1>
      <p className="mt-1 mb-6 text-sm text-ink-muted">Start a group workspace for your sites and evenings.</p>
      <SignUpForm />
    </>
  );
}
