import { z } from "zod";

const email = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: "Enter a valid e-mail address." }).max(255, { error: "Use at most 255 characters." }));

export const signInSchema = z.object({
  email,
  password: z
    .string({ error: "Enter your password." })
    .min(1, { error: "Enter your password." })
    .max(256, { error: "Use at most 256 characters." }),
});

export const signUpSchema = z.object({
  email,
  password: z
    .string({ error: "Choose a password." })
    .min(10, { error: "Use at least 10 characters." })
    .max(256, { error: "Use at most 256 characters." }),
  displayName: z
    .string({ error: "Enter your name." })
    .trim()
    .min(1, { error: "Enter your name." })
    .max(120, { error: "Use at most 120 characters." }),
  groupName: z
    .string({ error: "Name your research group." })
    .trim()
    .min(1, { error: "Name your research group." })
    .max(120, { error: "Use at most 120 characters." }),
});

export type SignInInput = z.infer<typeof signInSchema>;
export type SignUpInput = z.infer<typeof signUpSchema>;

/** What the auth actions return to their forms (they redirect on success). */
export type ActionState = { ok: boolean; message?: string; fieldErrors?: Record<string, string[]> };
