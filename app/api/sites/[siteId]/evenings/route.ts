import { AuthError } from "@/lib/auth/session";
import { handleRouteError } from "@/lib/http/respond";
import { idSchema, rangeSchema } from "@/features/review/schemas";
import { caller, siteAccess } from "@/features/review/server/access";
import { listEveningsJson } from "@/features/review/server/queries";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/evenings?from=YYYY-MM-DD&to=YYYY-MM-DD - the labelled evenings of a period
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const user = await caller(request);
    const siteId = idSchema.safeParse((await ctx.params).siteId);
    if (!siteId.success) throw new AuthError("not_found");
    await siteAccess(user, siteId.data);
    const q = new URL(request.url).searchParams;
    const range = rangeSchema.parse({ from: q.get("from") ?? undefined, to: q.get("to") ?? undefined });
    return new Response(await listEveningsJson(siteId.data, range), {
      headers: { "content-type": "application/json; charset=utf-8" },
    });
  } catch (err) {
    return handleRouteError(err);
  }
}
