import "server-only";
import { notFound, redirect } from "next/navigation";
import { AuthError, requireSession } from "@/lib/auth/session";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import type { ImportSummary, ImportTemplate } from "@/features/imports/schemas";
import { siteForCaller, type ImportSiteRow } from "@/features/imports/server/access";
import { getTemplate, listImports } from "@/features/imports/server/queries";

export type ImportPageData = {
  site: ImportSiteRow;
  role: Role;
  imports: ImportSummary[];
  template: ImportTemplate | null;
  /** Local dates of the first and last stored half-hour, or null without data. */
  span: { from: string; to: string } | null;
};

/** Everything the import page shows; a stranger's or missing site is the not-found page. */
export async function loadImportPage(rawSiteId: string): Promise<ImportPageData> {
  const siteId = /^\d{1,12}$/.test(rawSiteId) ? Number(rawSiteId) : NaN;
  if (!Number.isSafeInteger(siteId) || siteId <= 0) notFound();
  let access: Awaited<ReturnType<typeof siteForCaller>>;
  try {
    access = await siteForCaller({ userId: (await requireSession()).user.id }, siteId, "viewer");
  } catch (err) {
    if (err instanceof AuthError && err.code === "unauthenticated") redirect("/sign-in");
    if (err instanceof AuthError) notFound();
    throw err;
  }
  const { site, role } = access;
  const [imports, template, range] = await Promise.all([
    listImports(site.id),
    getTemplate(site.id),
    db("half_hours").where({ site_id: site.id }).min({ first: "start_utc" }).max({ last: "start_utc" }).first() as Promise<{ first: Date | null; last: Date | null } | undefined>,
  ]);
  const local = (d: Date) => new Date(new Date(d).getTime() + site.utc_offset_hours * 3_600_000).toISOString().slice(0, 10);
  const span = range?.first && range.last ? { from: local(range.first), to: local(range.last) } : null;
  return { site, role, imports, template, span };
}
