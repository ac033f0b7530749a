import "server-only";
import { db } from "@/lib/db/knex";
import { AuthError, requireRole, requireSession } from "@/lib/auth/session";
import type { Role } from "@/lib/auth/roles";
import type { SiteCoverageRow, SiteRow } from "@/lib/db/tables";
import { LABEL_ORDER } from "@/lib/ui/label-badge";
import type { LabelCounts, Site, SiteCoverage, SiteSummary } from "@/features/sites/schemas";

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

const HALF_HOUR_MS = 30 * 60_000;

type CoverageRow = Pick<SiteCoverageRow, "site_id" | "present_half_hours"> & {
  first_start_utc: Date;
  last_start_utc: Date;
};
type LabelCountRow = { site_id: number; label: keyof LabelCounts; n: number | string };

/**
 * Sites of one group with their summaries, by name. The caller has checked membership.
 * Three queries whatever the number of sites: the sites, their stored coverage summaries
 * (site_coverage, kept by the import write, so no half-hour is read here) and the evenings
 * grouped by site.
 */
export async function listSites(groupId: number): Promise<SiteSummary[]> {
  const groupSites = db("sites").select("id").where({ group_id: groupId });
  const [rows, coverage, labels] = await Promise.all([
    db("sites").where({ group_id: groupId }).orderBy("name"),
    // A site whose rows were all deleted keeps a row with nothing stored: no coverage then.
    db("site_coverage")
      .whereIn("site_id", groupSites)
      .where("stored_half_hours", ">", 0)
      .whereNotNull("first_start_utc")
      .whereNotNull("last_start_utc")
      .select<CoverageRow[]>("site_id", "present_half_hours", "first_start_utc", "last_start_utc"),
    db("evenings")
      .whereIn("site_id", groupSites)
      .groupBy("site_id", "final_label")
      .select<LabelCountRow[]>("site_id", "final_label as label", db.raw("COUNT(*) AS n")),
  ]);

  const countsBySite = new Map<number, LabelCounts>();
  for (const r of labels) {
    let counts = countsBySite.get(r.site_id);
    if (!counts) {
      counts = Object.fromEntries(LABEL_ORDER.map((l) => [l, 0])) as LabelCounts;
      countsBySite.set(r.site_id, counts);
    }
    counts[r.label] += Number(r.n);
  }
  const coverageBySite = new Map(coverage.map((r) => [r.site_id, r]));

  return rows.map((r) => {
    const labelCounts = countsBySite.get(r.id) ?? null;
    const c = coverageBySite.get(r.id);
    return { ...toSite(r), coverage: c ? toCoverage(c, labelCounts) : null, labelCounts };
  });
}

function toCoverage(c: CoverageRow, labelCounts: LabelCounts | null): SiteCoverage {
  // The table holds half-hourly periods; the span counts both ends.
  const spanHalfHours =
    Math.round((c.last_start_utc.getTime() - c.first_start_utc.getTime()) / HALF_HOUR_MS) + 1;
  const presentHalfHours = Number(c.present_half_hours);
  return {
    firstUtc: c.first_start_utc.toISOString(),
    lastUtc: c.last_start_utc.toISOString(),
    presentHalfHours,
    spanHalfHours,
    share: presentHalfHours / spanHalfHours,
    evenings: labelCounts ? LABEL_ORDER.reduce((sum, l) => sum + labelCounts[l], 0) : 0,
  };
}

/** One site of one group, or null; a site of another group is simply not found. */
export async function getSite(groupId: number, siteId: number): Promise<Site | null> {
  const row = await db("sites").where({ id: siteId, group_id: groupId }).first();
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
  const row = await db("sites").where({ id: siteId }).first();
  if (!row) throw new AuthError("not_found");
  const { user, role } = await requireRole(row.group_id, minimum);
  return { site: toSite(row), role, userId: user.id };
}
