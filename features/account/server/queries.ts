import "server-only";
import { listApiTokens } from "@/lib/auth/tokens";
import type { TokenView } from "@/features/account/schemas";

/** The person's tokens for the account page, newest first. */
export async function tokensOf(userId: string): Promise<TokenView[]> {
  return (await listApiTokens(userId)).map((t) => ({
    id: t.id,
    name: t.name,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
  }));
}
