import { requestCaller } from "@/lib/auth/session";
import { handleRouteError, json } from "@/lib/http/respond";
import { seasonQuerySchema } from "@/features/seasons/schemas";
import { seasonReport } from "@/features/seasons/server/queries";

// GET /api/seasons?sites=ID,ID&from=YYYY-MM-DD&to=YYYY-MM-DD[&scheme&labels] - label counts per season
export async function GET(request: Request): Promise<Response> {
  try {
    // scripts send an API token; the browser its session cookie
    const { user } = await requestCaller(request);
    const query = seasonQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    return json(await seasonReport(user, query));
  } catch (err) {
    return handleRouteError(err);
  }
}
