import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { AuthError, requestCaller, type SessionUser } from "@/lib/auth/session";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";
import { stampQuery } from "@/lib/evenings/stamp";
import { compiledRead } from "@/lib/db/compiled";

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

/** The caller of a route handler or page: an API token (Bearer) or the session cookie. */
export async function caller(request?: Request): Promise<SessionUser> {
  return (await requestCaller(request)).user;
}

function check(role: Role | null, minimum: Role): Role {
  if (role === null) throw new AuthError("not_found");
  if (!roleAtLeast(role, minimum)) throw new AuthError("forbidden");
  return role;
}

/** The columns `judgeAccess` reads, added to a query by `ACCESS_COLUMNS`. */
export type AccessRow = {
  access_site_id: number;
  access_role: string | null;
  access_group_id: number;
  access_site_name: string;
  access_latitude: number;
  access_longitude: number;
  access_utc_offset_hours: number | string;
};

/**
 * The site and the caller's membership, under names of their own so that they can sit beside
 * another table's columns in one row (queries that read the data and its access in one trip).
 */
export const ACCESS_COLUMNS = [
  "s.id as access_site_id",
  "m.role as access_role",
  "s.group_id as access_group_id",
  "s.name as access_site_name",
  "s.latitude as access_latitude",
  "s.longitude as access_longitude",
  "s.utc_offset_hours as access_utc_offset_hours",
];

function toReviewSite(r: AccessRow): ReviewSite {
  return {
    id: r.access_site_id,
    groupId: r.access_group_id,
    name: r.access_site_name,
    latitude: r.access_latitude,
    longitude: r.access_longitude,
    utcOffsetHours: Number(r.access_utc_offset_hours),
  };
}

// The site and the caller's membership come back in one round trip (a left join: no row means no
// such site, a null role means the caller is not in its group).
function withMembership(q: Knex.QueryBuilder, userId: string): Knex.QueryBuilder {
  return q.leftJoin("memberships as m", function () {
    this.on("m.group_id", "=", "s.group_id").andOn("m.user_id", "=", db.raw("?", [userId]));
  });
}

/** Adds the site of `evenings as e` and `userId`'s membership of its group to a query (see ACCESS_COLUMNS). */
export function withEveningAccess(q: Knex.QueryBuilder, userId: string): Knex.QueryBuilder {
  return withMembership(q.join("sites as s", "s.id", "e.site_id"), userId);
}

/** The site and role an access row grants at `minimum`; throws not_found or forbidden. */
export function judgeAccess(row: AccessRow | undefined, minimum: Role): { site: ReviewSite; role: Role } {
  if (!row) throw new AuthError("not_found");
  const role = check(row.access_role !== null && isRole(row.access_role) ? row.access_role : null, minimum);
  return { site: toReviewSite(row), role };
}

/** A site `user` may see with at least `minimum`, and their role. */
export async function siteAccess(
  user: SessionUser,
  siteId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: AccessRow | undefined = await withMembership(
    db("sites as s").where("s.id", siteId),
    user.id,
  ).first(ACCESS_COLUMNS);
  return judgeAccess(row, minimum);
}

/**
 * Like siteAccess, with the change stamp of the site's evenings in `range` (lib/evenings/stamp.ts)
 * read in the same round trip.
 */
export async function siteAccessStamped(
  user: SessionUser,
  siteId: number,
  range: { from: string; to: string },
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role; stamp: string }> {
  const [row] = await accessAndStamp({ siteId, userId: user.id, from: range.from, to: range.to });
  return { ...judgeAccess(row, minimum), stamp: row?.stamp ?? "0.0.0" };
}

// The read of every calendar request, compiled once (lib/db/compiled.ts).
const accessAndStamp = compiledRead<
  { siteId: number; userId: string; from: string; to: string },
  AccessRow & { stamp: string | null }
>({ siteId: -7_401, userId: "\u0000sentinel:user", from: "\u0000sentinel:from", to: "\u0000sentinel:to" }, (p) =>
  withMembership(db("sites as s").where("s.id", p.siteId), p.userId)
    .select([...ACCESS_COLUMNS, stampQuery({ siteIds: [p.siteId], from: p.from, to: p.to }).as("stamp")])
    .limit(1),
);

/** The site of an evening `user` may see with at least `minimum`, and their role. */
export async function eveningAccess(
  user: SessionUser,
  eveningId: number,
  minimum: Role = "viewer",
): Promise<{ site: ReviewSite; role: Role }> {
  const row: AccessRow | undefined = await withEveningAccess(
    db("evenings as e").where("e.id", eveningId),
    user.id,
  ).first(ACCESS_COLUMNS);
  return judgeAccess(row, minimum);
}
