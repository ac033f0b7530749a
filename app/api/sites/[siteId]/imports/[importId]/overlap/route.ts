import { requestCaller } from "@/lib/auth/session";
import { errorResponse, json, readJson } from "@/lib/http/respond";
import { overlapChoiceSchema } from "@/features/imports/schemas";
import { siteForCaller } from "@/features/imports/server/access";
import { idParam, importRouteError } from "@/features/imports/server/http";
import { resolveOverlap } from "@/features/imports/server/mutations";

type Context = { params: Promise<{ siteId: string; importId: string }> };

// POST /api/sites/:siteId/imports/:importId/overlap - {"choice": "replace"|"keep"|"cancel"} for an import waiting on an overlap
export async function POST(request: Request, ctx: Context): Promise<Response> {
  try {
    const p = await ctx.params;
    const { user } = await requestCaller(request);
    const { site } = await siteForCaller({ userId: user.id }, idParam(p.siteId), "analyst");
    const body = (await readJson(request)) as { choice?: unknown };
    const choice = overlapChoiceSchema.parse(body.choice);
    const result = await resolveOverlap(site, user.id, idParam(p.importId), choice);
    if (!result.ok) return errorResponse(409, "conflict", result.message);
    return json({ choice, jobId: result.jobId });
  } catch (err) {
    return importRouteError(err);
  }
}
