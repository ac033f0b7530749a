import { AuthError, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError } from "@/lib/http/respond";
import { groupIdSchema, invitationIdSchema } from "@/features/team/schemas";
import { resendInvitation } from "@/features/team/server/mutations";

type Context = { params: Promise<{ groupId: string; invitationId: string }> };

// POST /api/groups/:groupId/invitations/:invitationId/resend - a fresh link, 7 more days (lead)
export async function POST(_request: Request, ctx: Context): Promise<Response> {
  try {
    await requireSession();
    const p = await ctx.params;
    const groupId = groupIdSchema.safeParse(p.groupId);
    const invitationId = invitationIdSchema.safeParse(p.invitationId);
    if (!groupId.success || !invitationId.success) throw new AuthError("not_found");
    const result = await resendInvitation(groupId.data, invitationId.data);
    if (!result.ok) return errorResponse(409, result.code, result.message);
    return new Response(null, { status: 204 });
  } catch (err) {
    return handleRouteError(err);
  }
}
