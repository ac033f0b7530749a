/*
 * Reading this run's local catcher (tests/global-setup.ts starts it). Tests deliver only
 * their own recipients' mail, so parallel files never consume each other's messages.
 */
import { inject } from "vitest";
import type { CaughtMessage } from "@/lib/mail/catcher";
import { listCaughtMessages } from "@/lib/mail/caught";
import { deliverDue } from "@/lib/mail/outbox";

/** Everything the catcher received for `address`, oldest first. */
export async function caughtFor(address: string): Promise<CaughtMessage[]> {
  return (await listCaughtMessages(inject("mailDir"))).filter((m) => m.to.includes(address)).reverse();
}

/** Delivers the outbox rows due for `address` through real SMTP to the catcher; returns what it now holds for them. */
export async function deliverFor(address: string): Promise<CaughtMessage[]> {
  await deliverDue({ filter: { to: address } });
  return caughtFor(address);
}

/** The first link in `text` whose path starts with `pathPrefix` (e.g. "/invitations/"). */
export function linkIn(text: string, pathPrefix: string): URL {
  for (const m of text.matchAll(/https?:\/\/\S+/g)) {
    const url = new URL(m[0]);
    if (url.pathname.startsWith(pathPrefix)) return url;
  }
  throw new Error(`no link to ${pathPrefix}… in:\n${text}`);
}

/** The last path segment of a link (the secret in invitation and reset links). */
export function tokenOf(url: URL): string {
  return url.pathname.split("/").filter(Boolean).at(-1) ?? "";
}
