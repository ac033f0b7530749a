import { requestCaller } from "@/lib/auth/session";
import { handleRouteError, json, readJson } from "@/lib/http/respond";
import { previewSchema } from "@/features/rules/schemas";
import { previewRuleSet } from "@/features/rules/server/preview";

// POST /api/rule-sets/preview - what-if labels of a site and period under a definition (analyst); saves nothing
export async function POST(request: Request): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const input = previewSchema.parse(await readJson(request));
    return json(await previewRuleSet(user, input));
  } catch (err) {
    return handleRouteError(err);
  }
}
