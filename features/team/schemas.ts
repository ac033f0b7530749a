import { z } from "zod";
import { ROLES, type Role } from "@/lib/auth/roles";

const email = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: "Enter a valid e-mail address." }).max(255, { error: "Use at most 255 characters." }));

const role = z.enum(ROLES as [Role, ...Role[]], { error: "Choose lead, analyst or viewer." });

export const groupIdSchema = z.coerce.number().int().positive();
export const invitationIdSchema = z.coerce.number().int().positive();
export const userIdSchema = z.string().regex(/^[a-z0-9]{1,40}$/);

export const inviteSchema = z.object({ email, role });
export const roleChangeSchema = z.object({ role });

const password = z
  .string({ error: "Choose a password." })
  .min(10, { error: "Use at least 10 characters." })
  .max(256, { error: "Use at most 256 characters." });

/** Accepting as a new person: the account is created with these. */
export const acceptNewSchema = z.object({
  displayName: z
    .string({ error: "Enter your name." })
    .trim()
    .min(1, { error: "Enter your name." })
    .max(120, { error: "Use at most 120 characters." }),
  password,
});

/** Accepting with an existing account that is not signed in: its password proves it is theirs. */
export const acceptExistingSchema = z.object({
  password: z.string({ error: "Enter your password." }).min(1, { error: "Enter your password." }).max(256),
});

export type InviteInput = z.infer<typeof inviteSchema>;

/** What the team actions return to their forms. */
export type TeamActionState = { ok: boolean; message?: string; fieldErrors?: Record<string, string[]> };

export type Member = {
  userId: string;
  email: string;
  displayName: string;
  role: Role;
  joinedAt: string;
};

export type InvitationStatus = "pending" | "expired" | "accepted" | "revoked";

export type Invitation = {
  id: number;
  email: string;
  role: Role;
  status: InvitationStatus;
  invitedBy: string | null;
  sentAt: string;
  expiresAt: string;
};
