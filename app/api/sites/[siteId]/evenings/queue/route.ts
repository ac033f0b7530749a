import { AuthError } from "@/lib/auth/session";
import { handleRouteError, json } from "@/lib/http/respond";
import { idSchema, rangeSchema } from "@/features/review/schemas";
import { caller, siteAccess } from "@/features/review/server/access";
import { getQueue } from "@/features/review/server/queries";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/evenings/queue?from&to - evenings of a period ranked by need of review
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const user = await caller(request);
    const siteId = idSchema.safeParse((await ctx.params).siteId);
    if (!siteId.success) throw new AuthError("not_found");
    await siteAccess(user, siteId.data);
    const q = new URL(request.url).searchParams;
    const range = rangeSchema.parse({ from: q.get("from") ?? undefined, to: q.get("to") ?? undefined });
    return json({ queue: await getQueue(siteId.data, range) });
  } catch (err) {
    return handleRouteError(err);
  }
}
