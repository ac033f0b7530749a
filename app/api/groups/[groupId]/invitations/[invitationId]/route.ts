import { revokeInvitation } from "@/features/team/server/mutations";
import { invitationRoute } from "@/features/team/server/invitation-route";

// DELETE /api/groups/:groupId/invitations/:invitationId - revoke an invitation (lead)
export const DELETE = invitationRoute(revokeInvitation);
