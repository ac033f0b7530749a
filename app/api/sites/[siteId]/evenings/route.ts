import { AuthError } from "@/lib/auth/session";
import { handleRouteError, PRIVATE_UNCOMPRESSED } from "@/lib/http/respond";
import { idSchema, rangeSchema } from "@/features/review/schemas";
import { caller, siteAccessStamped } from "@/features/review/server/access";
import { listEveningsBody } from "@/features/review/server/queries";

type Context = { params: Promise<{ siteId: string }> };

// See PRIVATE_UNCOMPRESSED: a 304 while the ETag (the evenings' change stamp) still matches, and
// the body plain.
const CACHE_CONTROL = PRIVATE_UNCOMPRESSED;

function matches(ifNoneMatch: string | null, etag: string): boolean {
  return ifNoneMatch !== null && ifNoneMatch.split(",").some((t) => t.trim().replace(/^W\//, "") === etag);
}

// GET /api/sites/:siteId/evenings?from=YYYY-MM-DD&to=YYYY-MM-DD - the labelled evenings of a period
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const user = await caller(request);
    const siteId = idSchema.safeParse((await ctx.params).siteId);
    if (!siteId.success) throw new AuthError("not_found");
    const q = new URL(request.url).searchParams;
    const range = rangeSchema.parse({ from: q.get("from") ?? undefined, to: q.get("to") ?? undefined });
    // access and the change stamp in one round trip; a refusal still comes before any evening is read
    const { stamp } = await siteAccessStamped(user, siteId.data, range);
    const { body, etag } = await listEveningsBody(siteId.data, range, stamp);
    if (matches(request.headers.get("if-none-match"), etag)) {
      return new Response(null, { status: 304, headers: { etag, "cache-control": CACHE_CONTROL } });
    }
    return new Response(body, {
      headers: { "content-type": "application/json; charset=utf-8", etag, "cache-control": CACHE_CONTROL },
    });
  } catch (err) {
    return handleRouteError(err);
  }
}
