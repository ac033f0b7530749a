import "server-only";
import { notFound, redirect } from "next/navigation";
import { cache } from "react";
import { AuthError } from "@/lib/auth/session";
import type { Role } from "@/lib/auth/roles";
import { siteIdSchema, type Site } from "@/features/sites/schemas";
import { getSiteForMember } from "@/features/sites/server/queries";

/**
 * For pages: the site named by a route segment, or the segment's not-found page. Cached per
 * request, since generateMetadata and the page both ask.
 */
export const loadSiteForPage = cache(async (rawSiteId: string): Promise<{ site: Site; role: Role }> => {
  const parsed = siteIdSchema.safeParse(rawSiteId);
  if (!parsed.success) notFound();
  try {
    const { site, role } = await getSiteForMember(parsed.data);
    return { site, role };
  } catch (err) {
    if (err instanceof AuthError && err.code === "unauthenticated") redirect("/sign-in");
    if (err instanceof AuthError) notFound();
    throw err;
  }
});
