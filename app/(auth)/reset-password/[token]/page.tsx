import type { Metadata } from "next";
import Link from "next/link";
import { FormMessage } from "@/lib/ui/field";
import { ResetPasswordForm } from "@/features/recovery/components/reset-password-form";
import { resetPasswordAction } from "@/features/recovery/server/actions";
import { isResetTokenUsable } from "@/features/recovery/server/resets";

export const metadata: Metadata = { title: "Choose a new password", robots: { index: false } };

export default async function ResetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const usable = await isResetTokenUsable(token);
  return (
    <>
      <h1 className="text-xl font-semibold tracking-tight">Choose a new password</h1>
      <div className="mt-6">
        {usable ? (
          <ResetPasswordForm action={resetPasswordAction.bind(null, token)} />
        ) : (
          <div className="space-y-4">
            <FormMessage tone="error">This reset link was used already or has expired.</FormMessage>
            <Link href="/reset-password" className="btn-quiet w-full">
              Ask for a new link
            </Link>
          </div>
        )}
      </div>
    </>
  );
}
