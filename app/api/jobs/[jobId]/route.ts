import { AuthError, requestCaller } from "@/lib/auth/session";
import { json } from "@/lib/http/respond";
import { roleIn } from "@/features/imports/server/access";
import { idParam, importRouteError } from "@/features/imports/server/http";
import { getJobRow, jobView } from "@/features/imports/server/queries";

type Context = { params: Promise<{ jobId: string }> };

// GET /api/jobs/:jobId - phase, progress, result (and the import with its report, for import jobs)
export async function GET(request: Request, ctx: Context): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const job = await getJobRow(idParam((await ctx.params).jobId));
    // Another group's job is as unknown as a missing one.
    if (!job || !(await roleIn(user.id, job.group_id))) throw new AuthError("not_found");
    return json({ job: await jobView(job) });
  } catch (err) {
    return importRouteError(err);
  }
}
