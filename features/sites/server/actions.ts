"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { flattenError } from "zod";
import { AuthError } from "@/lib/auth/session";
import {
  groupIdSchema,
  siteFields,
  siteIdSchema,
  siteInputSchema,
  type SiteField,
  type SiteFormState,
} from "@/features/sites/schemas";
import {
  createSite,
  deleteSite,
  updateSite,
  type SiteMutationResult,
} from "@/features/sites/server/mutations";

const FIELDS = Object.keys(siteFields.shape) as SiteField[];

function typedValues(formData: FormData): Partial<Record<SiteField, string>> {
  const values: Partial<Record<SiteField, string>> = {};
  for (const f of FIELDS) {
    const v = formData.get(f);
    if (typeof v === "string") values[f] = v;
  }
  return values;
}

function authProblem(err: unknown): SiteFormState {
  if (err instanceof AuthError) {
    if (err.code === "unauthenticated") redirect("/sign-in");
    if (err.code === "forbidden")
      return { ok: false, message: "Only a lead of this group can change its sites." };
    return { ok: false, message: "This site does not exist or is not in one of your groups." };
  }
  throw err;
}

async function save(
  formData: FormData,
  run: (input: ReturnType<typeof siteInputSchema.parse>) => Promise<SiteMutationResult>,
): Promise<SiteFormState & { siteId?: number }> {
  const values = typedValues(formData);
  const parsed = siteInputSchema.safeParse(values);
  if (!parsed.success) {
    return {
      ok: false,
      message: "Some values need attention.",
      fieldErrors: flattenError(parsed.error).fieldErrors,
      values,
    };
  }
  let result: SiteMutationResult;
  try {
    result = await run(parsed.data);
  } catch (err) {
    return { ...authProblem(err), values };
  }
  if (!result.ok) return { ok: false, message: result.message, fieldErrors: result.fieldErrors, values };
  revalidatePath("/sites");
  return { ok: true, siteId: result.site.id };
}

/** Form action of "New site": creates a site in the group named by the form's groupId. */
export async function createSiteAction(_prev: SiteFormState, formData: FormData): Promise<SiteFormState> {
  const groupId = groupIdSchema.safeParse(formData.get("groupId"));
  if (!groupId.success) return { ok: false, message: "The form lost its group; reload the page." };
  const state = await save(formData, (input) => createSite(groupId.data, input));
  if (state.ok && state.siteId !== undefined) redirect(`/sites/${state.siteId}`);
  return state;
}

/** Form action of "Edit site"; bind the site id: updateSiteAction.bind(null, siteId). */
export async function updateSiteAction(
  siteId: number,
  _prev: SiteFormState,
  formData: FormData,
): Promise<SiteFormState> {
  // Bound arguments come from the client too; never trust their type.
  if (!siteIdSchema.safeParse(siteId).success) return { ok: false, message: "Unknown site." };
  const state = await save(formData, (input) => updateSite(siteId, input));
  if (state.ok) {
    revalidatePath(`/sites/${siteId}`);
    redirect(`/sites/${siteId}`);
  }
  return state;
}

/** Deletes a site; the caller navigates away on success. */
export async function deleteSiteAction(siteId: number): Promise<SiteFormState> {
  if (!siteIdSchema.safeParse(siteId).success) return { ok: false, message: "Unknown site." };
  try {
    await deleteSite(siteId);
  } catch (err) {
    return authProblem(err);
  }
  revalidatePath("/sites");
  return { ok: true, message: "Site deleted." };
}
