import "server-only";
import type { Role } from "@/lib/auth/roles";
import { appLink } from "@/lib/mail/transport";
import type { OutgoingMail } from "@/lib/mail/outbox";

const ROLE_WORDS: Record<Role, string> = {
  lead: "lead (manages sites, members and rules)",
  analyst: "analyst (imports data and reviews evenings)",
  viewer: "viewer (browses evenings and exports)",
};

/** The invitation message; the secret only ever lives in this mail. */
export function invitationMail(opts: {
  to: string;
  token: string;
  groupName: string;
  role: Role;
  inviterName: string;
  expiresAt: Date;
}): OutgoingMail {
  const link = appLink(`/invitations/${opts.token}`);
  return {
    kind: "invitation",
    to: opts.to,
    subject: `Invitation to ${opts.groupName} on Gloaming`,
    text: [
      `${opts.inviterName} invites you to the research group "${opts.groupName}" on Gloaming as ${ROLE_WORDS[opts.role]}.`,
      "",
      "Accept the invitation:",
      link,
      "",
      `The link works once and expires on ${opts.expiresAt.toUTCString()}.`,
      "If you did not expect this invitation, ignore this message; nothing happens without the link.",
    ].join("\n"),
  };
}
