import { z } from "zod";
import { requestCaller } from "@/lib/auth/session";
import { handleRouteError, json, readJson } from "@/lib/http/respond";
import { newVersionSchema } from "@/features/rules/schemas";
import { createRuleSetVersion } from "@/features/rules/server/mutations";
import { listRuleSets } from "@/features/rules/server/queries";

// GET /api/rule-sets?groupId=ID - every version of a group's rules, newest first
export async function GET(request: Request): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const groupId = z.coerce.number().int().positive().parse(new URL(request.url).searchParams.get("groupId"));
    return json({ ruleSets: await listRuleSets(user, groupId) });
  } catch (err) {
    return handleRouteError(err);
  }
}

// POST /api/rule-sets - a new version (lead); versions are never edited in place
export async function POST(request: Request): Promise<Response> {
  try {
    const { user } = await requestCaller(request);
    const input = newVersionSchema.parse(await readJson(request));
    const stored = await createRuleSetVersion(user, input);
    return json({ ruleSet: { id: stored.id, version: stored.version, name: stored.name } }, { status: 201 });
  } catch (err) {
    return handleRouteError(err);
  }
}
