import { z } from "zod";

/** Creating a personal API token: a label for the script or computer that will use it. */
export const createTokenSchema = z.object({
  name: z
    .string()
    .trim()
    .min(1, "Name the token after the script or computer that will use it.")
    .max(80, "At most 80 characters."),
});

export const revokeTokenSchema = z.object({ tokenId: z.coerce.number().int().positive() });

/** A token as the account page shows it (never its secret). */
export type TokenView = {
  id: number;
  name: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
};

export type TokenFormState = {
  ok: boolean;
  message?: string;
  fieldErrors?: { name?: string[] };
  /** the new token, with its secret, in the one response that carries it */
  created?: { id: number; name: string; secret: string };
};

export type RevokeState = { ok: boolean; message?: string };
