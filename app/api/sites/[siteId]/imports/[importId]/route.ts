import { requestCaller } from "@/lib/auth/session";
import { errorResponse, json } from "@/lib/http/respond";
import { siteForCaller } from "@/features/imports/server/access";
import { idParam, importRouteError } from "@/features/imports/server/http";
import { deleteImport } from "@/features/imports/server/mutations";
import { getImport } from "@/features/imports/server/queries";

type Context = { params: Promise<{ siteId: string; importId: string }> };

// GET /api/sites/:siteId/imports/:importId - one import with its validation report
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const p = await ctx.params;
    const { user } = await requestCaller(request);
    const { site } = await siteForCaller({ userId: user.id }, idParam(p.siteId), "viewer");
    const found = await getImport(site.id, idParam(p.importId));
    if (!found) return errorResponse(404, "not_found", "Not found.");
    return json({ import: found });
  } catch (err) {
    return importRouteError(err);
  }
}

// DELETE /api/sites/:siteId/imports/:importId - remove its rows (analyst); ?purge=1 also removes the original (lead)
export async function DELETE(request: Request, ctx: Context): Promise<Response> {
  try {
    const p = await ctx.params;
    const purge = ["1", "true", "yes"].includes(new URL(request.url).searchParams.get("purge") ?? "");
    const { user } = await requestCaller(request);
    const { site } = await siteForCaller({ userId: user.id }, idParam(p.siteId), purge ? "lead" : "analyst");
    const result = await deleteImport(site, user.id, idParam(p.importId), purge);
    if (!result.ok) return errorResponse(result.status, result.status === 404 ? "not_found" : "conflict", result.message);
    return json({ import: result.import, recomputeJobId: result.recomputeJobId });
  } catch (err) {
    return importRouteError(err);
  }
}
