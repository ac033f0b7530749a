import { Readable } from "node:stream";
import { requestCaller } from "@/lib/auth/session";
import { errorResponse } from "@/lib/http/respond";
import { getObject } from "@/lib/storage/storage";
import { siteForCaller } from "@/features/imports/server/access";
import { idParam, importRouteError } from "@/features/imports/server/http";
import { getImport } from "@/features/imports/server/queries";

type Context = { params: Promise<{ siteId: string; importId: string }> };

// GET /api/sites/:siteId/imports/:importId/rejected - the full list of rejected cells as CSV
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const p = await ctx.params;
    const { user } = await requestCaller(request);
    const { site } = await siteForCaller({ userId: user.id }, idParam(p.siteId), "viewer");
    const found = await getImport(site.id, idParam(p.importId));
    if (!found) return errorResponse(404, "not_found", "Not found.");
    const key = found.report?.rejectedKey ?? null;
    const name = `rejected-${found.id}-${found.originalName.replace(/[^A-Za-z0-9._-]+/g, "_").replace(/\.csv$/i, "")}.csv`;
    const headers = { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${name}"` };
    if (!key) return new Response("line,column,value,reason\n", { headers });
    const stream = Readable.toWeb(Readable.from(await getObject(key))) as ReadableStream<Uint8Array>;
    return new Response(stream, { headers });
  } catch (err) {
    return importRouteError(err);
  }
}
