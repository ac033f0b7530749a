import "server-only";
import { AuthError } from "@/lib/auth/session";
import { roleAtLeast, type Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import type { SiteRow } from "@/lib/db/tables";

/** The sites columns the import needs. */
export type ImportSiteRow = Pick<
  SiteRow,
  | "id"
  | "group_id"
  | "name"
  | "latitude"
  | "longitude"
  | "elevation_m"
  | "measurement_height_m"
  | "canopy_height_m"
  | "displacement_height_m"
  | "utc_offset_hours"
>;

/** Whom an import check is for (the person requestCaller() or requireSession() identified, or a job's creator). */
export type Caller = { userId: string };

/** Role of a user in a group, or null when not a member. */
export async function roleIn(userId: string, groupId: number): Promise<Role | null> {
  const row = await db<{ user_id: string; group_id: number; role: Role }>("memberships")
    .where({ user_id: userId, group_id: groupId })
    .first("role");
  return row?.role ?? null;
}

/**
 * A site the caller may use at `minimum` role. A missing site and one of another group both
 * answer not_found, so nobody learns that another group's site exists.
 */
export async function siteForCaller(
  caller: Caller,
  siteId: number,
  minimum: Role,
): Promise<{ site: ImportSiteRow; role: Role }> {
  const site = (await db("sites").where({ id: siteId }).first()) as ImportSiteRow | undefined;
  if (!site) throw new AuthError("not_found");
  const role = await roleIn(caller.userId, site.group_id);
  if (!role) throw new AuthError("not_found");
  if (!roleAtLeast(role, minimum)) throw new AuthError("forbidden");
  return { site: { ...site, utc_offset_hours: Number(site.utc_offset_hours) }, role };
}
