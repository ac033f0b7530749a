import { AuthError, requireSession } from "@/lib/auth/session";
import { handleRouteError, json } from "@/lib/http/respond";
import { anomaliesInRange } from "@/lib/anomalies/server/queries";
import { siteIdSchema } from "@/features/sites/schemas";
import { getSiteForMember } from "@/features/sites/server/queries";
import { anomalyRangeSchema } from "@/features/anomalies/schemas";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/anomalies?from=&to= - anomalies of evenings in a local-date range, with each evening's current label
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    await requireSession();
    const parsed = siteIdSchema.safeParse((await ctx.params).siteId);
    if (!parsed.success) throw new AuthError("not_found");
    const { site } = await getSiteForMember(parsed.data, "viewer");
    const params = new URL(request.url).searchParams;
    const range = anomalyRangeSchema.parse({ from: params.get("from"), to: params.get("to") });
    const rows = await anomaliesInRange(site.id, range.from ?? null, range.to ?? null);
    return json({
      anomalies: rows.map((a) => ({
        series: a.series,
        kind: a.kind,
        start: a.start,
        end: a.end,
        peakScore: a.peakScore,
        eveningDate: a.eveningDate,
        label: a.label,
      })),
    });
  } catch (err) {
    return handleRouteError(err);
  }
}
