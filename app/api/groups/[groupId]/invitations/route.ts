import { AuthError, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError, json, readJson } from "@/lib/http/respond";
import { groupIdSchema, inviteSchema } from "@/features/team/schemas";
import { inviteMember } from "@/features/team/server/mutations";
import { listInvitations } from "@/features/team/server/queries";

type Context = { params: Promise<{ groupId: string }> };

async function groupIdOf(ctx: Context): Promise<number> {
  await requireSession();
  const parsed = groupIdSchema.safeParse((await ctx.params).groupId);
  if (!parsed.success) throw new AuthError("not_found");
  return parsed.data;
}

// GET /api/groups/:groupId/invitations - open and recent invitations (lead)
export async function GET(_request: Request, ctx: Context): Promise<Response> {
  try {
    return json({ invitations: await listInvitations(await groupIdOf(ctx)) });
  } catch (err) {
    return handleRouteError(err);
  }
}

// POST /api/groups/:groupId/invitations - invite an address with a role (lead); body { email, role }
export async function POST(request: Request, ctx: Context): Promise<Response> {
  try {
    const groupId = await groupIdOf(ctx);
    const input = inviteSchema.parse(await readJson(request));
    const result = await inviteMember(groupId, input);
    if (!result.ok) return errorResponse(409, result.code, result.message);
    return json({ invitationId: result.invitationId }, { status: 201 });
  } catch (err) {
    return handleRouteError(err);
  }
}
