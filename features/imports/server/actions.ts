"use server";

import { revalidatePath } from "next/cache";
import { flattenError } from "zod";
import { AuthError, requireSession } from "@/lib/auth/session";
import { overlapChoiceSchema, recomputeSchema } from "@/features/imports/schemas";
import { siteForCaller } from "@/features/imports/server/access";
import { deleteImport, queueRecompute, resolveOverlap } from "@/features/imports/server/mutations";

export type ImportActionState = {
  ok: boolean;
  message?: string;
  fieldErrors?: Record<string, string[]>;
  /** The job to follow, when the action queued one. */
  jobId?: number | null;
};

function authMessage(err: unknown): ImportActionState {
  if (err instanceof AuthError) {
    const m = { unauthenticated: "Sign in again to continue.", forbidden: "Your role in this group does not allow this.", not_found: "Not found." };
    return { ok: false, message: m[err.code] };
  }
  throw err;
}

/** Answers an import's overlap question: replace the overlap, keep what is stored, or cancel. */
export async function resolveOverlapAction(siteId: number, importId: number, choice: string): Promise<ImportActionState> {
  try {
    const parsed = overlapChoiceSchema.safeParse(choice);
    if (!parsed.success) return { ok: false, message: "Choose replace, keep or cancel." };
    const { user } = await requireSession();
    const { site } = await siteForCaller({ userId: user.id }, siteId, "analyst");
    const result = await resolveOverlap(site, user.id, importId, parsed.data);
    revalidatePath(`/sites/${siteId}/imports`);
    return result.ok ? { ok: true, jobId: result.jobId } : { ok: false, message: result.message };
  } catch (err) {
    return authMessage(err);
  }
}

/** Deletes an import's rows (analyst); `purge` also removes the original file (lead). */
export async function deleteImportAction(siteId: number, importId: number, purge: boolean): Promise<ImportActionState> {
  try {
    const { user } = await requireSession();
    const { site } = await siteForCaller({ userId: user.id }, siteId, purge ? "lead" : "analyst");
    const result = await deleteImport(site, user.id, importId, purge);
    revalidatePath(`/sites/${siteId}/imports`);
    if (!result.ok) return { ok: false, message: result.message };
    return { ok: true, jobId: result.recomputeJobId, message: purge ? "Rows and original removed." : "Rows removed; the original file is kept." };
  } catch (err) {
    return authMessage(err);
  }
}

/** Recomputes the evenings of a period with the site's active rule set, in the background. */
export async function recomputeAction(_prev: ImportActionState, formData: FormData): Promise<ImportActionState> {
  try {
    const parsed = recomputeSchema.safeParse({ siteId: formData.get("siteId"), from: formData.get("from"), to: formData.get("to") });
    if (!parsed.success) return { ok: false, fieldErrors: flattenError(parsed.error).fieldErrors, message: "Check the period." };
    const { user } = await requireSession();
    const { site } = await siteForCaller({ userId: user.id }, parsed.data.siteId, "analyst");
    const jobId = await queueRecompute(site, user.id, parsed.data.from, parsed.data.to);
    return { ok: true, jobId, message: `Recomputing ${parsed.data.from} to ${parsed.data.to}.` };
  } catch (err) {
    return authMessage(err);
  }
}
