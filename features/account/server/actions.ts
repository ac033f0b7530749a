"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { flattenError } from "zod";
import { AuthError, requireSession, type CurrentSession } from "@/lib/auth/session";
import { TokenError, createApiToken, revokeApiToken } from "@/lib/auth/tokens";
import { recordAudit } from "@/lib/db/audit";
import { createTokenSchema, revokeTokenSchema, type RevokeState, type TokenFormState } from "@/features/account/schemas";

async function signedIn(): Promise<CurrentSession> {
  try {
    return await requireSession();
  } catch (err) {
    if (err instanceof AuthError) redirect("/sign-in");
    throw err;
  }
}

// A token must not mint or revoke tokens: only a signed-in person manages them.
const viaToken = (s: CurrentSession) => s.sessionId.startsWith("token:");

/** Creates a personal API token; the returned state carries its secret this once. */
export async function createTokenAction(_prev: TokenFormState, formData: FormData): Promise<TokenFormState> {
  const session = await signedIn();
  if (viaToken(session)) return { ok: false, message: "Sign in in the browser to manage tokens." };
  const parsed = createTokenSchema.safeParse({ name: formData.get("name") ?? "" });
  if (!parsed.success) return { ok: false, fieldErrors: flattenError(parsed.error).fieldErrors };
  try {
    const created = await createApiToken(session.user.id, parsed.data.name);
    await recordAudit({
      groupId: null,
      userId: session.user.id,
      action: "token.create",
      entityType: "api_token",
      entityId: created.id,
      detail: { name: created.name },
    });
    revalidatePath("/account");
    return { ok: true, created };
  } catch (err) {
    if (err instanceof TokenError) return { ok: false, message: err.message };
    throw err;
  }
}

/** Revokes one of the person's own tokens; scripts using it are refused from now on. */
export async function revokeTokenAction(_prev: RevokeState, formData: FormData): Promise<RevokeState> {
  const session = await signedIn();
  if (viaToken(session)) return { ok: false, message: "Sign in in the browser to manage tokens." };
  const parsed = revokeTokenSchema.safeParse({ tokenId: formData.get("tokenId") });
  if (!parsed.success) return { ok: false, message: "No such token." };
  const revoked = await revokeApiToken(session.user.id, parsed.data.tokenId);
  if (!revoked) return { ok: false, message: "This token is already revoked or is not yours." };
  await recordAudit({
    groupId: null,
    userId: session.user.id,
    action: "token.revoke",
    entityType: "api_token",
    entityId: parsed.data.tokenId,
  });
  revalidatePath("/account");
  return { ok: true, message: "Token revoked." };
}
