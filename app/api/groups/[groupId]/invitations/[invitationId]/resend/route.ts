import { resendInvitation } from "@/features/team/server/mutations";
import { invitationRoute } from "@/features/team/server/invitation-route";

// POST /api/groups/:groupId/invitations/:invitationId/resend - a fresh link, 7 more days (lead)
export const POST = invitationRoute(resendInvitation);
