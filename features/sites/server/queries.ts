import "server-only";
import { db } from "@/lib/db/knex";
import { AuthError, requireRole, requireSession } from "@/lib/auth/session";
import type { Role } from "@/lib/auth/roles";
import type { Site, SiteSummary } from "@/features/sites/schemas";

/** Row of the sites table as mysql2 returns it. */
export type SiteRow = {
  id: number;
  group_id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevation_m: number;
  measurement_height_m: number;
  canopy_height_m: number;
  displacement_height_m: number | null;
  utc_offset_hours: number;
  notes: string | null;
  created_at: Date;
  updated_at: Date;
};

/** Row to client shape; dates become ISO strings so server props and API answers agree. */
export function toSite(row: SiteRow): Site {
  return {
    id: row.id,
    groupId: row.group_id,
    name: row.name,
    latitude: row.latitude,
    longitude: row.longitude,
    elevationM: row.elevation_m,
    measurementHeightM: row.measurement_height_m,
    canopyHeightM: row.canopy_height_m,
    displacementHeightM: row.displacement_height_m,
    utcOffsetHours: Number(row.utc_offset_hours),
    notes: row.notes,
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  };
}

/** Sites of one group with their summaries, by name. The caller has checked membership. */
export async function listSites(groupId: number): Promise<SiteSummary[]> {
  const rows = await db<SiteRow>("sites").where({ group_id: groupId }).orderBy("name");
  // Coverage and label counts arrive with the import and classification features.
  return rows.map((r) => ({ ...toSite(r), coverage: null, labelCounts: null }));
}

/** One site of one group, or null; a site of another group is simply not found. */
export async function getSite(groupId: number, siteId: number): Promise<Site | null> {
  const row = await db<SiteRow>("sites").where({ id: siteId, group_id: groupId }).first();
  return row ? toSite(row) : null;
}

/**
 * A site the signed-in person may see, with their role in its group. Throws
 * AuthError("not_found") alike for a missing site and for one of a group they are not in,
 * so nobody learns that another group's site exists.
 */
export async function getSiteForMember(
  siteId: number,
  minimum: Role = "viewer",
): Promise<{ site: Site; role: Role; userId: string }> {
  // Without a session the answer is 401 whether or not the site exists.
  await requireSession();
  const row = await db<SiteRow>("sites").where({ id: siteId }).first();
  if (!row) throw new AuthError("not_found");
  const { user, role } = await requireRole(row.group_id, minimum);
  return { site: toSite(row), role, userId: user.id };
}
