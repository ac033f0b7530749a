import { AuthError, getActiveGroup, requireRole, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError, json, readJson } from "@/lib/http/respond";
import { groupIdSchema, siteInputSchema } from "@/features/sites/schemas";
import { listSites } from "@/features/sites/server/queries";
import { createSite } from "@/features/sites/server/mutations";

/** The group named by ?groupId=, else the body's groupId, else the active group. */
async function resolveGroupId(request: Request, body?: unknown): Promise<number> {
  const fromQuery = new URL(request.url).searchParams.get("groupId");
  const fromBody = typeof body === "object" && body !== null && "groupId" in body ? body.groupId : undefined;
  const given = fromQuery ?? fromBody;
  if (given !== undefined && given !== null) return groupIdSchema.parse(given);
  await requireSession();
  const active = await getActiveGroup();
  if (!active) throw new AuthError("not_found");
  return active.groupId;
}

// GET /api/sites - sites of the active group (or ?groupId=) with their summaries
export async function GET(request: Request): Promise<Response> {
  try {
    await requireSession();
    const groupId = await resolveGroupId(request);
    await requireRole(groupId, "viewer");
    return json({ groupId, sites: await listSites(groupId) });
  } catch (err) {
    return handleRouteError(err);
  }
}

// POST /api/sites - create a site (lead of the group)
export async function POST(request: Request): Promise<Response> {
  try {
    await requireSession();
    const body = await readJson(request);
    const groupId = await resolveGroupId(request, body);
    // Role before validation: a viewer learns nothing from field messages.
    await requireRole(groupId, "lead");
    const input = siteInputSchema.parse(body);
    const result = await createSite(groupId, input);
    if (!result.ok) return errorResponse(409, "conflict", result.message, result.fieldErrors);
    return json({ site: result.site }, { status: 201 });
  } catch (err) {
    return handleRouteError(err);
  }
}
