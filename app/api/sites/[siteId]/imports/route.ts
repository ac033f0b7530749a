import { requestCaller } from "@/lib/auth/session";
import { json } from "@/lib/http/respond";
import { parseSettingsJson } from "@/features/imports/schemas";
import { siteForCaller } from "@/features/imports/server/access";
import { idParam, importRouteError } from "@/features/imports/server/http";
import { startImport } from "@/features/imports/server/mutations";
import { listImports } from "@/features/imports/server/queries";
import { receiveUpload } from "@/features/imports/server/upload";

type Context = { params: Promise<{ siteId: string }> };

// GET /api/sites/:siteId/imports - import history of a site (any member)
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const { site } = await siteForCaller({ userId: user.id }, idParam((await ctx.params).siteId), "viewer");
    return json({ imports: await listImports(site.id) });
  } catch (err) {
    return importRouteError(err);
  }
}

// POST /api/sites/:siteId/imports - multipart upload (part "file", optional part "mapping" as JSON); answers with the job id
export async function POST(request: Request, ctx: Context): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    // The role is checked before a byte of the file is stored.
    const { site } = await siteForCaller({ userId: user.id }, idParam((await ctx.params).siteId), "analyst");
    const upload = await receiveUpload(request);
    const settings = parseSettingsJson(upload.fields.mapping);
    const result = await startImport({ site, userId: user.id, stored: upload, filename: upload.filename, settings });
    if (result.kind === "already") {
      return json({ status: "already_imported", importId: result.importId, jobId: result.jobId, sha256: upload.sha256, message: result.message });
    }
    return json(
      { status: "queued", importId: result.importId, jobId: result.jobId, sha256: upload.sha256, size: upload.size, job: `/api/jobs/${result.jobId}` },
      { status: 202 },
    );
  } catch (err) {
    return importRouteError(err);
  }
}
