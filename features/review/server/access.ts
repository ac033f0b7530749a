import "server-only";
import type { Knex } from "knex";
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

function check(role: Role | null, minimum: Role): Role {
  if (role === null) throw new AuthError("not_found");
  if (!roleAtLeast(role, minimum)) throw new AuthError("forbidden");
  return role;
}

type SiteRow = {
  id: number;
  role: string | null;
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

// The site and the caller's membership come back in one round trip (a left join: no row means no
// such site, a null role means the caller is not in its group).
function siteColumns(): string[] {
  return [...["id", "group_id", "name", "latitude", "longitude", "utc_offset_hours"].map((c) => `s.${c}`), "m.role"];
}

function withMembership(q: Knex.QueryBuilder, userId: string): Knex.QueryBuilder {
  return q.leftJoin("memberships as m", function () {
    this.on("m.group_id", "=", "s.group_id").andOn("m.user_id", "=", db.raw("?", [userId]));
  });
}

function judged(row: SiteRow | undefined, minimum: Role): { site: ReviewSite; role: Role } {
  if (!row) throw new AuthError("not_found");
  const role = check(row.role !== null && isRole(row.role) ? row.role : null, minimum);
  return { site: toReviewSite(row), role };
}

/** A site `user` may see with at least `minimum`, and their role. */
export async function siteAccess(
  user: SessionUser,
  siteId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: SiteRow | undefined = await withMembership(db("sites as s").where("s.id", siteId), user.id).first(
    siteColumns(),
  );
  return judged(row, minimum);
}

/** The site of an evening `user` may see with at least `minimum`, and their role. */
export async function eveningAccess(
  user: SessionUser,
  eveningId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: SiteRow | undefined = await withMembership(
    db("evenings as e").join("sites as s", "s.id", "e.site_id").where("e.id", eveningId),
    user.id,
  ).first(siteColumns());
  return judged(row, minimum);
}
