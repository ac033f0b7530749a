import { AuthError, requireSession } from "@/lib/auth/session";
import { handleRouteError, json } from "@/lib/http/respond";
import { groupIdSchema } from "@/features/team/schemas";
import { listMembers } from "@/features/team/server/queries";

type Context = { params: Promise<{ groupId: string }> };

// GET /api/groups/:groupId/members - members of a group the caller belongs to
export async function GET(_request: Request, ctx: Context): Promise<Response> {
  try {
    await requireSession();
    const groupId = groupIdSchema.safeParse((await ctx.params).groupId);
    if (!groupId.success) throw new AuthError("not_found");
    return json({ members: await listMembers(groupId.data) });
  } catch (err) {
    return handleRouteError(err);
  }
}
