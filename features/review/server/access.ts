import "server-only";
import { db } from "@/lib/db/knex";
import { AuthError, requireSession, type SessionUser } from "@/lib/auth/session";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";

/*
 * Who is asking and what they may see. Every reader and mutation of this feature goes through
 * here: a person outside the site's group gets "not_found" (the site stays hidden), a member
 * below the needed role "forbidden".
 */

export type ReviewSite = {
  id: number;
  groupId: number;
  name: string;
  latitude: number;
  longitude: number;
  utcOffsetHours: number;
};

/** The caller of a route handler or page (session cookie; API tokens once they exist). */
export async function caller(_request?: Request): Promise<SessionUser> {
  return (await requireSession()).user;
}

async function roleIn(userId: string, groupId: number): Promise<Role | null> {
  const row: { role: string } | undefined = await db("memberships")
    .where({ user_id: userId, group_id: groupId })
    .first("role");
  return row && isRole(row.role) ? row.role : null;
}

function check(role: Role | null, minimum: Role): Role {
  if (role === null) throw new AuthError("not_found");
  if (!roleAtLeast(role, minimum)) throw new AuthError("forbidden");
  return role;
}

type SiteRow = {
  id: number;
  group_id: number;
  name: string;
  latitude: number;
  longitude: number;
  utc_offset_hours: number | string;
};

function toReviewSite(r: SiteRow): ReviewSite {
  return {
    id: r.id,
    groupId: r.group_id,
    name: r.name,
    latitude: r.latitude,
    longitude: r.longitude,
    utcOffsetHours: Number(r.utc_offset_hours),
  };
}

const SITE_COLUMNS = ["id", "group_id", "name", "latitude", "longitude", "utc_offset_hours"];

/** A site `user` may see with at least `minimum`, and their role. */
export async function siteAccess(
  user: SessionUser,
  siteId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: SiteRow | undefined = await db("sites").where({ id: siteId }).first(SITE_COLUMNS);
  if (!row) throw new AuthError("not_found");
  const role = check(await roleIn(user.id, row.group_id), minimum);
  return { site: toReviewSite(row), role };
}

/** The site of an evening `user` may see with at least `minimum`, and their role. */
export async function eveningAccess(
  user: SessionUser,
  eveningId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: SiteRow | undefined = await db("evenings as e")
    .join("sites as s", "s.id", "e.site_id")
    .where("e.id", eveningId)
    .first(SITE_COLUMNS.map((c) => `s.${c}`));
  if (!row) throw new AuthError("not_found");
  const role = check(await roleIn(user.id, row.group_id), minimum);
  return { site: toReviewSite(row), role };
}
