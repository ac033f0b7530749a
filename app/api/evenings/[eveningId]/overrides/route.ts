import { AuthError } from "@/lib/auth/session";
import { errorResponse, handleRouteError, json, readJson } from "@/lib/http/respond";
import { idSchema, overrideInputSchema } from "@/features/review/schemas";
import { caller } from "@/features/review/server/access";
import { overrideEvening } from "@/features/review/server/mutations";

type Context = { params: Promise<{ eveningId: string }> };

// POST /api/evenings/:eveningId/overrides - set a person's label with a required note (analyst, lead); body { label, note, version }
export async function POST(request: Request, ctx: Context): Promise<Response> {
  try {
    const user = await caller(request);
    const id = idSchema.safeParse((await ctx.params).eveningId);
    if (!id.success) throw new AuthError("not_found");
    const input = overrideInputSchema.parse(await readJson(request));
    const result = await overrideEvening(user, id.data, input);
    if (result.ok) return json({ evening: result.evening }, { status: 200 });
    if (result.status === 409) return json(result.body, { status: 409 });
    return errorResponse(422, result.code, result.message);
  } catch (err) {
    return handleRouteError(err);
  }
}
