import "server-only";
import { AuthError } from "@/lib/auth/session";
import { errorResponse, handleRouteError } from "@/lib/http/respond";
import { UploadError } from "@/features/imports/server/upload";

/** A positive integer id from a route segment; anything else names nothing (404). */
export function idParam(raw: string): number {
  const n = /^\d{1,15}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(n) || n <= 0) throw new AuthError("not_found");
  return n;
}

/** handleRouteError plus the upload's own answers (413, 415, 422). */
export function importRouteError(err: unknown): Response {
  if (err instanceof UploadError) return errorResponse(err.status, err.code, err.message);
  return handleRouteError(err);
}
