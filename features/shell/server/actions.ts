"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { AuthError, setActiveGroup } from "@/lib/auth/session";

const switchSchema = z.object({ groupId: z.coerce.number().int().positive() });

/**
 * Group switcher: makes a group the active one (membership checked by setActiveGroup) and
 * goes to its site list, since the page on screen may belong to the previous group.
 */
export async function switchGroupAction(formData: FormData): Promise<void> {
  const parsed = switchSchema.safeParse({ groupId: formData.get("groupId") });
  if (!parsed.success) redirect("/sites");
  try {
    await setActiveGroup(parsed.data.groupId);
  } catch (err) {
    if (err instanceof AuthError && err.code === "unauthenticated") redirect("/sign-in");
    // Not a member: leave the active group as it was.
    if (!(err instanceof AuthError)) throw err;
  }
  revalidatePath("/", "layout");
  redirect("/sites");
}
