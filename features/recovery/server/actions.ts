"use server";

import { redirect } from "next/navigation";
import { flattenError } from "zod";
import { startSession } from "@/lib/auth/session";
import {
  RESET_REQUESTED_MESSAGE,
  newPasswordSchema,
  requestResetSchema,
  type RecoveryState,
} from "@/features/recovery/schemas";
import { requestPasswordReset, resetPassword } from "@/features/recovery/server/resets";

function field(formData: FormData, key: string): string | undefined {
  const v = formData.get(key);
  return typeof v === "string" ? v : undefined;
}

/** "Forgot password": queues a link when the address has an account; the answer is the same either way. */
export async function requestResetAction(_prev: RecoveryState, formData: FormData): Promise<RecoveryState> {
  const parsed = requestResetSchema.safeParse({ email: field(formData, "email") });
  if (!parsed.success) {
    return { ok: false, message: "Check the field marked below.", fieldErrors: flattenError(parsed.error).fieldErrors };
  }
  await requestPasswordReset(parsed.data.email);
  return { ok: true, message: RESET_REQUESTED_MESSAGE };
}

/** "Choose a new password": bind the token, resetPasswordAction.bind(null, token). Signs in and redirects on success. */
export async function resetPasswordAction(token: string, _prev: RecoveryState, formData: FormData): Promise<RecoveryState> {
  const parsed = newPasswordSchema.safeParse({ password: field(formData, "password"), confirm: field(formData, "confirm") });
  if (!parsed.success) {
    return { ok: false, message: "Check the fields marked below.", fieldErrors: flattenError(parsed.error).fieldErrors };
  }
  if (typeof token !== "string") return { ok: false, message: "This reset link is not valid." };
  const userId = await resetPassword(token, parsed.data.password);
  if (!userId) return { ok: false, message: "This reset link was used already or has expired. Ask for a new one." };
  await startSession(userId);
  redirect("/sites");
}
