import "server-only";
import { db } from "@/lib/db/knex";
import type { SiteRow } from "@/lib/db/tables";
import { AuthError, type SessionUser } from "@/lib/auth/session";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";

/** The site as the export reads it (the sites row without its timestamps). */
export type ExportSite = Omit<SiteRow, "created_at" | "updated_at">;

/** A site `user` may see with at least `minimum`; other groups' sites are simply not found. */
export async function exportSite(
  user: SessionUser,
  siteId: number,
  minimum: Role = "viewer",
): Promise<{ site: ExportSite; role: Role }> {
  const site = await db("sites").where({ id: siteId }).first<ExportSite | undefined>();
  if (!site) throw new AuthError("not_found");
  const m: { role: string } | undefined = await db("memberships")
    .where({ user_id: user.id, group_id: site.group_id })
    .first("role");
  if (!m || !isRole(m.role)) throw new AuthError("not_found");
  if (!roleAtLeast(m.role, minimum)) throw new AuthError("forbidden");
  return { site: { ...site, utc_offset_hours: Number(site.utc_offset_hours) }, role: m.role };
}

/** A positive integer id from a route segment; anything else names nothing (404). */
export function idParam(raw: string): number {
  const n = /^\d{1,12}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(n) || n <= 0) throw new AuthError("not_found");
  return n;
}
