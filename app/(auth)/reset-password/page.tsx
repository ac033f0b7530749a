import type { Metadata } from "next";
import { RequestResetForm } from "@/features/recovery/components/request-reset-form";
import { requestResetAction } from "@/features/recovery/server/actions";

export const metadata: Metadata = { title: "Reset password" };

export default function RequestResetPage() {
  return (
    <>
      <h1 className="text-xl font-semibold tracking-tight">Reset your password</h1>
      <p className="mt-1 mb-6 text-sm text-ink-muted">We send a link to choose a new password. It works once, for one hour.</p>
      <RequestResetForm action={requestResetAction} />
    </>
  );
}
