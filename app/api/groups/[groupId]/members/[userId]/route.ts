import { AuthError, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError, readJson } from "@/lib/http/respond";
import { groupIdSchema, roleChangeSchema, userIdSchema } from "@/features/team/schemas";
import { changeMemberRole, removeMember, type TeamResult } from "@/features/team/server/mutations";

type Context = { params: Promise<{ groupId: string; userId: string }> };

async function idsOf(ctx: Context): Promise<{ groupId: number; userId: string }> {
  await requireSession();
  const p = await ctx.params;
  const groupId = groupIdSchema.safeParse(p.groupId);
  const userId = userIdSchema.safeParse(p.userId);
  if (!groupId.success || !userId.success) throw new AuthError("not_found");
  return { groupId: groupId.data, userId: userId.data };
}

function answer(result: TeamResult): Response {
  if (result.ok) return new Response(null, { status: 204 });
  return errorResponse(result.code === "not_found" ? 404 : 409, result.code, result.message);
}

// PATCH /api/groups/:groupId/members/:userId - change a member's role (lead); body { role }
export async function PATCH(request: Request, ctx: Context): Promise<Response> {
  try {
    const { groupId, userId } = await idsOf(ctx);
    const { role } = roleChangeSchema.parse(await readJson(request));
    return answer(await changeMemberRole(groupId, userId, role));
  } catch (err) {
    return handleRouteError(err);
  }
}

// DELETE /api/groups/:groupId/members/:userId - remove a member (lead)
export async function DELETE(_request: Request, ctx: Context): Promise<Response> {
  try {
    const { groupId, userId } = await idsOf(ctx);
    return answer(await removeMember(groupId, userId));
  } catch (err) {
    return handleRouteError(err);
  }
}
