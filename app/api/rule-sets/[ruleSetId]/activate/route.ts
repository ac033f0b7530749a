import { requestCaller } from "@/lib/auth/session";
import { handleRouteError, json, readJson } from "@/lib/http/respond";
import { activateSchema } from "@/features/rules/schemas";
import { idParam } from "@/features/rules/server/access";
import { activateRuleSet } from "@/features/rules/server/mutations";

type Context = { params: Promise<{ ruleSetId: string }> };

// POST /api/rule-sets/:ruleSetId/activate {siteId} - use this version at a site (lead); re-labels in a job
export async function POST(request: Request, ctx: Context): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const ruleSetId = idParam((await ctx.params).ruleSetId);
    const { siteId } = activateSchema.parse(await readJson(request));
    const { jobId, ruleSet } = await activateRuleSet(user, ruleSetId, siteId);
    return json({ jobId, ruleSetId: ruleSet.id, version: ruleSet.version }, { status: 202 });
  } catch (err) {
    return handleRouteError(err);
  }
}
