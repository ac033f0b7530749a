import "server-only";
import type { z } from "zod";
import type { SessionUser } from "@/lib/auth/session";
import { AuthError } from "@/lib/auth/session";
import { errorResponse, handleRouteError, json, readJson } from "@/lib/http/respond";
import { idSchema } from "@/features/review/schemas";
import { caller } from "@/features/review/server/access";
import type { ReviewMutationResult } from "@/features/review/server/mutations";

type Context = { params: Promise<{ eveningId: string }> };

/**
 * The POST handler shared by every change to one evening (override, revert, reviewed):
 * caller -> evening id -> body schema -> mutation, answering 200 { evening }, 409 with the
 * newer state, or 422.
 */
export function eveningMutationRoute<S extends z.ZodType>(
  schema: S,
  mutate: (user: SessionUser, eveningId: number, input: z.infer<S>) => Promise<ReviewMutationResult>,
): (request: Request, ctx: Context) => Promise<Response> {
  return async (request, ctx) => {
    try {
      const user = await caller(request);
      const id = idSchema.safeParse((await ctx.params).eveningId);
      if (!id.success) throw new AuthError("not_found");
      const input = schema.parse(await readJson(request));
      const result = await mutate(user, id.data, input);
      if (result.ok) return json({ evening: result.evening }, { status: 200 });
      if (result.status === 409) return json(result.body, { status: 409 });
      return errorResponse(422, result.code, result.message);
    } catch (err) {
      return handleRouteError(err);
    }
  };
}
