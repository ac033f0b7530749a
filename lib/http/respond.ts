import "server-only";
import { ZodError, flattenError } from "zod";
import { AuthError, CrossOriginError } from "@/lib/auth/session";
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

/**
 * Cache-Control of the hot review reads (a calendar period, an evening). private: the answer
 * depends on who asks; no-cache: the browser asks again each time (a 304 when an ETag matches);
 * no-transform: Next's compression leaves the body alone. Next compresses route handler answers
 * afresh on every request (about 1.5 ms of CPU for an 8 kB evening, 5 ms for a 300 kB site-year),
 * more server time than the smaller body saves on the wire at campus or broadband speeds; and it
 * drops a route handler's own Content-Encoding, so a body compressed once cannot be sent instead.
 */
export const PRIVATE_UNCOMPRESSED = "private, no-cache, no-transform";

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
 * role too low or another site's Origin 403, unknown or hidden 404, body too large 413,
 * database unreachable 503 with Retry-After, everything else 500 with the cause logged here
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
  if (err instanceof BodyTooLargeError) {
    return errorResponse(413, "too_large", err.message);
  }
  if (err instanceof CrossOriginError) {
    return errorResponse(403, "cross_origin", err.message);
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

/** A request body above the limit; handleRouteError answers 413. */
export class BodyTooLargeError extends Error {
  constructor(readonly limitBytes: number) {
    super(`The request body is larger than the limit of ${Math.round(limitBytes / 1024)} KiB.`);
    this.name = "BodyTooLargeError";
  }
}

/** Largest JSON body a route handler reads, bytes (1 MiB; uploads have their own limit). */
export const JSON_BODY_LIMIT = 1024 * 1024;

/**
 * Reads a request body as UTF-8 text, refusing it with BodyTooLargeError once it exceeds
 * `limitBytes`: first by its declared Content-Length, then by counting while reading (a chunked
 * or lying sender is cut off without the rest being buffered).
 */
export async function readLimitedText(
  request: Request,
  limitBytes: number = JSON_BODY_LIMIT,
): Promise<string> {
  const declared = Number(request.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > limitBytes) throw new BodyTooLargeError(limitBytes);
  if (!request.body) return "";
  const reader = request.body.getReader();
  const decoder = new TextDecoder();
  let size = 0;
  let text = "";
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limitBytes) {
      await reader.cancel().catch(() => undefined);
      throw new BodyTooLargeError(limitBytes);
    }
    text += decoder.decode(value, { stream: true });
  }
  return text + decoder.decode();
}

/**
 * Parses a JSON request body of at most `limitBytes` (default 1 MiB); a malformed body becomes
 * a 400 and an oversized one a 413 through handleRouteError.
 */
export async function readJson(request: Request, limitBytes: number = JSON_BODY_LIMIT): Promise<unknown> {
  const text = await readLimitedText(request, limitBytes);
  if (text.trim() === "") return {};
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new BadJsonError("The request body is not valid JSON.");
  }
}
