import { AuthError, requireSession } from "@/lib/auth/session";
import { errorResponse, handleRouteError, json, readJson } from "@/lib/http/respond";
import { siteIdSchema, siteInputSchema } from "@/features/sites/schemas";
import { getSiteForMember } from "@/features/sites/server/queries";
import { deleteSite, updateSite } from "@/features/sites/server/mutations";

type Context = { params: Promise<{ siteId: string }> };

async function siteIdOf(ctx: Context): Promise<number> {
  await requireSession();
  const parsed = siteIdSchema.safeParse((await ctx.params).siteId);
  // A malformed id names no site: same answer as an unknown one.
  if (!parsed.success) throw new AuthError("not_found");
  return parsed.data;
}

// GET /api/sites/:siteId - one site of a group the caller belongs to
export async function GET(_request: Request, ctx: Context): Promise<Response> {
  try {
    const { site, role } = await getSiteForMember(await siteIdOf(ctx));
    return json({ site, role });
  } catch (err) {
    return handleRouteError(err);
  }
}

// PATCH /api/sites/:siteId - change some fields of a site (lead); the merged whole is validated
export async function PATCH(request: Request, ctx: Context): Promise<Response> {
  try {
    const siteId = await siteIdOf(ctx);
    const { site } = await getSiteForMember(siteId, "lead");
    const body = await readJson(request);
    const patch = typeof body === "object" && body !== null && !Array.isArray(body) ? body : {};
    const input = siteInputSchema.parse({ ...site, ...patch });
    const result = await updateSite(siteId, input);
    if (!result.ok) return errorResponse(409, "conflict", result.message, result.fieldErrors);
    return json({ site: result.site });
  } catch (err) {
    return handleRouteError(err);
  }
}

// DELETE /api/sites/:siteId - delete a site (lead)
export async function DELETE(_request: Request, ctx: Context): Promise<Response> {
  try {
    await deleteSite(await siteIdOf(ctx));
    return new Response(null, { status: 204 });
  } catch (err) {
    return handleRouteError(err);
  }
}
