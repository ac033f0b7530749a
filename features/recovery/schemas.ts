import { z } from "zod";

export const requestResetSchema = z.object({
  email: z
    .string({ error: "Enter your e-mail address." })
    .trim()
    .toLowerCase()
    .pipe(z.email({ error: "Enter a valid e-mail address." }).max(255, { error: "Use at most 255 characters." })),
});

export const newPasswordSchema = z
  .object({
    password: z
      .string({ error: "Choose a password." })
      .min(10, { error: "Use at least 10 characters." })
      .max(256, { error: "Use at most 256 characters." }),
    confirm: z.string({ error: "Repeat the password." }),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], error: "The two passwords differ." });

/** What the recovery actions return to their forms. */
export type RecoveryState = { ok: boolean; message?: string; fieldErrors?: Record<string, string[]> };

/** The one answer to a reset request, whether or not the address has an account. */
export const RESET_REQUESTED_MESSAGE =
  "If an account uses this address, a message with a reset link is on its way. The link works once, for one hour.";
