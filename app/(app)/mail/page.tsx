import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getActiveGroup } from "@/lib/auth/session";
import { env } from "@/lib/env";
import { getCaughtMessage, listCaughtMessages } from "@/lib/mail/caught";
import { PageHeader } from "@/lib/ui/page-header";

export const metadata: Metadata = { title: "Caught mail" };

// Development and demo only: the local catcher holds every message of the installation.
export default async function MailPage({ searchParams }: { searchParams: Promise<{ id?: string | string[] }> }) {
  const active = await getActiveGroup();
  if (!env.DEMO_MODE || active?.role !== "lead") notFound();
  const { id } = await searchParams;
  const messages = await listCaughtMessages();
  const open = typeof id === "string" ? await getCaughtMessage(id) : (messages[0] ?? null);

  return (
    <>
      <PageHeader
        title="Caught mail"
        eyebrow="Demo and development"
        description={`Every message the app sent to the local catcher (${env.MAIL_DIR}). With SMTP_HOST set, mail goes to that server instead.`}
      />
      {messages.length === 0 ? (
        <p className="text-sm text-ink-muted">Nothing caught yet. The worker delivers queued mail within a few seconds.</p>
      ) : (
        <div className="grid gap-6 lg:grid-cols-[22rem_1fr]">
          <ul className="card max-h-[70vh] divide-y divide-line overflow-y-auto" aria-label="Caught messages">
            {messages.map((m) => (
              <li key={m.id}>
                <Link
                  href={`/mail?id=${encodeURIComponent(m.id)}`}
                  aria-current={open?.id === m.id ? "true" : undefined}
                  className="block px-4 py-3 text-sm hover:bg-surface-sunken aria-[current=true]:bg-surface-sunken"
                >
                  <span className="block truncate font-medium">{m.subject || "(no subject)"}</span>
                  <span className="block truncate font-mono text-xs text-ink-muted">to {m.to.join(", ")}</span>
                  <span className="block text-xs text-ink-muted">{new Date(m.receivedAt).toUTCString()}</span>
                </Link>
              </li>
            ))}
          </ul>
          {open ? (
            <article className="card min-w-0 p-5" aria-labelledby="mail-subject">
              <h2 id="mail-subject" className="text-lg font-semibold">
                {open.subject || "(no subject)"}
              </h2>
              <dl className="mt-2 grid grid-cols-[5rem_1fr] gap-x-3 gap-y-1 text-xs">
                <dt className="text-ink-muted">From</dt>
                <dd className="font-mono">{open.from}</dd>
                <dt className="text-ink-muted">To</dt>
                <dd className="font-mono">{open.to.join(", ")}</dd>
                <dt className="text-ink-muted">Received</dt>
                <dd>{new Date(open.receivedAt).toUTCString()}</dd>
              </dl>
              <pre className="mt-4 overflow-x-auto font-mono text-sm break-words whitespace-pre-wrap" data-testid="mail-body">
                {linkify(open.text)}
              </pre>
            </article>
          ) : null}
        </div>
      )}
    </>
  );
}

function linkify(text: string) {
  return text.split(/(https?:\/\/\S+)/g).map((part, i) =>
    /^https?:\/\//.test(part) ? (
      <a key={i} href={part} className="text-dusk-700 underline dark:text-dusk-200">
        {part}
      </a>
    ) : (
      part
    ),
  );
}
