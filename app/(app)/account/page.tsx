import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { requireSession } from "@/lib/auth/session";
import { env } from "@/lib/env";
import { PageHeader } from "@/lib/ui/page-header";
import { TokenCreateForm } from "@/features/account/components/token-create-form";
import { TokenList } from "@/features/account/components/token-list";
import { createTokenAction, revokeTokenAction } from "@/features/account/server/actions";
import { tokensOf } from "@/features/account/server/queries";

export const metadata: Metadata = { title: "Account" };

export default async function AccountPage() {
  const { user } = await requireSession().catch(() => redirect("/sign-in"));
  const tokens = await tokensOf(user.id);
  return (
    <>
      <PageHeader title="Account" eyebrow={user.email} description={`Signed in as ${user.displayName}.`} />
      <section className="card max-w-3xl space-y-6 p-5" aria-labelledby="tokens-title">
        <div className="space-y-2">
          <h2 id="tokens-title" className="text-lg font-semibold">
            Personal API tokens
          </h2>
          <p className="text-sm text-ink-muted">
            A token lets a script act as you, with your roles in your groups, for example to upload each night&apos;s file
            from a tower computer. Send it as an <code className="font-mono text-xs">Authorization: Bearer</code> header:
          </p>
          <pre className="overflow-x-auto rounded-lg bg-surface-sunken p-3 font-mono text-xs text-ink">
            {`curl -H "Authorization: Bearer $GLOAMING_TOKEN" \\\n     -F file=@tower.csv ${env.APP_URL}/api/sites/SITE_ID/imports`}
          </pre>
          <p className="text-sm text-ink-muted">
            Only a fingerprint of each token is stored. Revoke a token when the computer that holds it is retired or lost.
          </p>
        </div>
        <TokenCreateForm action={createTokenAction} />
        <div className="space-y-2">
          <h2 className="text-base font-semibold">Your tokens</h2>
          <TokenList tokens={tokens} revoke={revokeTokenAction} />
        </div>
      </section>
    </>
  );
}
