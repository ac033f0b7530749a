import { AuthError, requireRole, requireSession } from "@/lib/auth/session";
import { authenticateRequest, requireRequestRole } from "@/lib/auth/tokens";
import { db } from "@/lib/db/knex";
import { handleRouteError, json } from "@/lib/http/respond";
import { anomaliesInRange, weakTurbulenceForSite } from "@/lib/anomalies/server/queries";
import { siteIdSchema } from "@/features/sites/schemas";
import { anomalyRangeSchema } from "@/features/anomalies/schemas";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/anomalies?from=&to=[&include=weak-turbulence] - anomalies of evenings in a local-date range, with each evening's current label
// (and, when asked, the nights with fluxes under weak turbulence)
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    // a script sends an API token (Bearer), a browser its session cookie
    const bearer = /^bearer\b/i.test(request.headers.get("authorization") ?? "");
    if (bearer ? !(await authenticateRequest(request)) : !(await requireSession()))
      throw new AuthError("unauthenticated");
    const parsed = siteIdSchema.safeParse((await ctx.params).siteId);
    if (!parsed.success) throw new AuthError("not_found");
    const site = await db("sites").where({ id: parsed.data }).first("id", "group_id");
    if (!site) throw new AuthError("not_found");
    if (bearer) await requireRequestRole(request, site.group_id, "viewer");
    else await requireRole(site.group_id, "viewer");
    const params = new URL(request.url).searchParams;
    const range = anomalyRangeSchema.parse({ from: params.get("from"), to: params.get("to") });
    const rows = await anomaliesInRange(site.id, range.from ?? null, range.to ?? null);
    const weak = params.getAll("include").includes("weak-turbulence")
      ? {
          weakTurbulence: (
            await weakTurbulenceForSite(site.id, { from: range.from, to: range.to }, { limit: 100_000 })
          ).evenings
            .map((w) => ({
              eveningDate: w.eveningDate,
              label: w.label,
              fluxSeries: w.fluxSeries,
              thresholdMs: w.thresholdMs,
              weakPeriods: w.weakPeriods,
              nightPeriods: w.nightPeriods,
            }))
            .reverse(),
        }
      : {};
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
      ...weak,
    });
  } catch (err) {
    return handleRouteError(err);
  }
}
