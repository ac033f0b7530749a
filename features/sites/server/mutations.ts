import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { requireRole } from "@/lib/auth/session";
import { recordAudit } from "@/lib/db/audit";
import type { Site, SiteField, SiteInput } from "@/features/sites/schemas";
import { getSiteForMember, toSite } from "@/features/sites/server/queries";

/*
 * Site changes, shared by the server actions and the route handlers. Each checks the
 * caller's role itself (lead only) and writes one audit_log row in the same transaction.
 */

export type SiteMutationResult =
  | { ok: true; site: Site }
  | { ok: false; message: string; fieldErrors: Partial<Record<SiteField, string[]>> };

const DUPLICATE_NAME: SiteMutationResult = {
  ok: false,
  message: "Another site of this group already has this name.",
  fieldErrors: { name: ["Another site of this group already has this name."] },
};

function toColumns(input: SiteInput) {
  return {
    name: input.name,
    latitude: input.latitude,
    longitude: input.longitude,
    elevation_m: input.elevationM,
    measurement_height_m: input.measurementHeightM,
    canopy_height_m: input.canopyHeightM,
    displacement_height_m: input.displacementHeightM ?? null,
    utc_offset_hours: input.utcOffsetHours,
    notes: input.notes ?? null,
  };
}

function isDuplicateKey(err: unknown): boolean {
  return typeof err === "object" && err !== null && "code" in err && err.code === "ER_DUP_ENTRY";
}

function audit(
  trx: Knex.Transaction,
  entry: { groupId: number; userId: string; action: string; siteId: number; detail: Record<string, unknown> },
): Promise<void> {
  return recordAudit(
    {
      groupId: entry.groupId,
      userId: entry.userId,
      action: entry.action,
      entityType: "site",
      entityId: entry.siteId,
      detail: entry.detail,
    },
    trx,
  );
}

/** Creates a site in a group; the caller must be its lead. */
export async function createSite(groupId: number, input: SiteInput): Promise<SiteMutationResult> {
  const { user } = await requireRole(groupId, "lead");
  try {
    const site = await db.transaction(async (trx) => {
      const [id] = await trx("sites").insert({ group_id: groupId, ...toColumns(input) });
      const row = await trx("sites").where({ id }).first();
      if (!row) throw new Error(`site ${String(id)} vanished after insert`);
      await audit(trx, {
        groupId,
        userId: user.id,
        action: "site.create",
        siteId: row.id,
        detail: { ...input },
      });
      return toSite(row);
    });
    return { ok: true, site };
  } catch (err) {
    if (isDuplicateKey(err)) return DUPLICATE_NAME;
    throw err;
  }
}

/** Replaces a site's settings; the caller must be lead of the site's group. */
export async function updateSite(siteId: number, input: SiteInput): Promise<SiteMutationResult> {
  const { site: before, userId } = await getSiteForMember(siteId, "lead");
  try {
    const site = await db.transaction(async (trx) => {
      await trx("sites").where({ id: siteId }).update(toColumns(input));
      const row = await trx("sites").where({ id: siteId }).first();
      if (!row) throw new Error(`site ${String(siteId)} vanished during update`);
      const after = toSite(row);
      await audit(trx, {
        groupId: before.groupId,
        userId,
        action: "site.update",
        siteId,
        detail: { changes: changedFields(before, after) },
      });
      return after;
    });
    return { ok: true, site };
  } catch (err) {
    if (isDuplicateKey(err)) return DUPLICATE_NAME;
    throw err;
  }
}

/** Deletes a site; the caller must be lead of the site's group. */
export async function deleteSite(siteId: number): Promise<void> {
  const { site, userId } = await getSiteForMember(siteId, "lead");
  await db.transaction(async (trx) => {
    await trx("sites").where({ id: siteId }).delete();
    // The audit row keeps what was deleted, since the row itself is gone.
    await audit(trx, { groupId: site.groupId, userId, action: "site.delete", siteId, detail: { site } });
  });
}

const COMPARED = [
  "name",
  "latitude",
  "longitude",
  "elevationM",
  "measurementHeightM",
  "canopyHeightM",
  "displacementHeightM",
  "utcOffsetHours",
  "notes",
] as const satisfies readonly SiteField[];

function changedFields(before: Site, after: Site) {
  const changes: Record<string, { from: unknown; to: unknown }> = {};
  for (const key of COMPARED) {
    if (before[key] !== after[key]) changes[key] = { from: before[key], to: after[key] };
  }
  return changes;
}
