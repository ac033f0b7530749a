import { AuthError, requireSession } from "@/lib/auth/session";
import { authenticateRequest } from "@/lib/auth/tokens";
import { handleRouteError, json } from "@/lib/http/respond";
import { seasonQuerySchema } from "@/features/seasons/schemas";
import { seasonReport } from "@/features/seasons/server/queries";

// GET /api/seasons?sites=ID,ID&from=YYYY-MM-DD&to=YYYY-MM-DD[&scheme&labels] - label counts per season
export async function GET(request: Request): Promise<Response> {
  try {
    // scripts send an API token; the browser its session cookie
    const bearer = /^bearer\b/i.test(request.headers.get("authorization") ?? "");
    const who = bearer ? await authenticateRequest(request) : await requireSession();
    if (!who) throw new AuthError("unauthenticated");
    const { user } = who;
    const query = seasonQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    return json(await seasonReport(user, query));
  } catch (err) {
    return handleRouteError(err);
  }
}
