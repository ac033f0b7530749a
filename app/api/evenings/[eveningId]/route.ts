import { AuthError } from "@/lib/auth/session";
import { handleRouteError, json, PRIVATE_UNCOMPRESSED } from "@/lib/http/respond";
import { idSchema } from "@/features/review/schemas";
import { caller } from "@/features/review/server/access";
import { eveningDetailFor } from "@/features/review/server/queries";

type Context = { params: Promise<{ eveningId: string }> };

// GET /api/evenings/:eveningId - one evening: metrics, thresholds, history and the series around sunset
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const user = await caller(request);
    const id = idSchema.safeParse((await ctx.params).eveningId);
    if (!id.success) throw new AuthError("not_found");
    return json(await eveningDetailFor(user, id.data), { headers: { "cache-control": PRIVATE_UNCOMPRESSED } });
  } catch (err) {
    return handleRouteError(err);
  }
}
