import "server-only";
import { AuthError, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError } from "@/lib/http/respond";
import { groupIdSchema, invitationIdSchema } from "@/features/team/schemas";
import type { TeamResult } from "@/features/team/server/mutations";

type Context = { params: Promise<{ groupId: string; invitationId: string }> };

/**
 * The handler shared by the changes to one invitation (resend, revoke): session -> group and
 * invitation ids from the path (a malformed id is 404, like a missing one) -> mutation, which
 * checks the lead role itself; 204, or 409 with the reason.
 */
export function invitationRoute(
  mutate: (groupId: number, invitationId: number) => Promise<TeamResult>,
): (request: Request, ctx: Context) => Promise<Response> {
  return async (_request, ctx) => {
    try {
      await requireSession();
      const p = await ctx.params;
      const groupId = groupIdSchema.safeParse(p.groupId);
      const invitationId = invitationIdSchema.safeParse(p.invitationId);
      if (!groupId.success || !invitationId.success) throw new AuthError("not_found");
      const result = await mutate(groupId.data, invitationId.data);
      if (!result.ok) return errorResponse(409, result.code, result.message);
      return new Response(null, { status: 204 });
    } catch (err) {
      return handleRouteError(err);
    }
  };
}
