import { Readable } from "node:stream";
import { requestCaller } from "@/lib/auth/session";
import { handleRouteError } from "@/lib/http/respond";
import { exportQuerySchema } from "@/features/exports/schemas";
import { exportSite, idParam } from "@/features/exports/server/access";
import { exportFileName, exportZip } from "@/features/exports/server/export";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/export?from=YYYY-MM-DD&to=YYYY-MM-DD[&halfHours=1] - zip of tagged evenings with provenance (viewer)
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const { site } = await exportSite(user, idParam((await ctx.params).siteId), "viewer");
    const query = exportQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    const zip = await exportZip(user, site, query);
    return new Response(Readable.toWeb(zip) as ReadableStream<Uint8Array>, {
      headers: {
        "content-type": "application/zip",
        "content-disposition": `attachment; filename="${exportFileName(site, query)}"`,
        "cache-control": "no-store",
      },
    });
  } catch (err) {
    return handleRouteError(err);
  }
}
