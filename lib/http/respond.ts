import "server-only";
import { ZodError, flattenError } from "zod";
import { AuthError } from "@/lib/auth/session";
import {
  DATABASE_RETRY_AFTER_S,
  DATABASE_UNAVAILABLE_MESSAGE,
  describeDatabaseError,
  isDatabaseUnavailable,
} from "@/lib/db/errors";

/** Body of every error answer from a route handler. */
export type ErrorBody = {
  error: { code: string; message: string; fieldErrors?: Record<string, string[]> };
};

/** A JSON response; `init.status` defaults to 200. */
export function json<T>(data: T, init?: ResponseInit): Response {
  return Response.json(data, init);
}

/** An error answer in the shape clients expect. */
export function errorResponse(
  status: number,
  code: string,
  message: string,
  fieldErrors?: Record<string, string[]>,
): Response {
  const body: ErrorBody = { error: { code, message, ...(fieldErrors ? { fieldErrors } : {}) } };
  return json(body, { status });
}

const AUTH_ANSWERS = {
  unauthenticated: [401, "Sign in to continue."],
  forbidden: [403, "Your role in this group does not allow this."],
  not_found: [404, "Not found."],
} as const;

/**
 * Maps anything a route handler throws to an answer: validation 422, no session 401,
 * role too low 403, unknown or hidden 404, database unreachable 503 with Retry-After,
 * everything else 500 with the cause logged here
 * and never sent (database messages stay on the server).
 */
export function handleRouteError(err: unknown): Response {
  if (err instanceof ZodError) {
    const { fieldErrors, formErrors } = flattenError(err);
    const message = formErrors[0] ?? "Some values need attention.";
    return errorResponse(422, "invalid", message, fieldErrors);
  }
  if (err instanceof BadJsonError) {
    return errorResponse(400, "bad_json", err.message);
  }
  if (err instanceof AuthError) {
    const [status, message] = AUTH_ANSWERS[err.code];
    return errorResponse(status, err.code, message);
  }
  if (isDatabaseUnavailable(err)) {
    console.error(`route handler: database unavailable (${describeDatabaseError(err)})`);
    const res = errorResponse(503, "unavailable", DATABASE_UNAVAILABLE_MESSAGE);
    res.headers.set("Retry-After", String(DATABASE_RETRY_AFTER_S));
    return res;
  }
  console.error("route handler failed", err);
  return errorResponse(500, "internal", "Something went wrong");
}

/** A request body that is not JSON. */
export class BadJsonError extends Error {}

/** Parses a JSON request body; a malformed body becomes a 400 through handleRouteError. */
export async function readJson(request: Request): Promise<unknown> {
  const text = await request.text();
  if (text.trim() === "") return {};
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new BadJsonError("The request body is not valid JSON.");
  }
}
