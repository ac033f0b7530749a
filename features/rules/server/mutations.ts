import "server-only";
import { db } from "@/lib/db/knex";
import { recordAudit } from "@/lib/db/audit";
import { AuthError, type SessionUser } from "@/lib/auth/session";
import { enqueueJob } from "@/lib/jobs/queue";
import { addRuleSetVersion, getRuleSet, setActiveRuleSet, type StoredRuleSet } from "@/lib/evenings/rulesets";
import type { NewVersionInput } from "@/features/rules/schemas";
import { groupRole, rulesSite } from "@/features/rules/server/access";

/*
 * Rule sets are never changed in place: an edit is a new version with its author and comment,
 * so every evening keeps naming the exact rules that labelled it. Activation is per site and
 * re-labels the site's evenings in a background job.
 */

export const RECLASSIFY_JOB = "reclassify";

export type ReclassifyPayload = { ruleSetId: number };

/** Stores a new version of a group's rules (lead). The definition is validated by parseRuleSet. */
export async function createRuleSetVersion(user: SessionUser, input: NewVersionInput): Promise<StoredRuleSet> {
  await groupRole(user, input.groupId, "lead");
  if (input.basedOnId !== undefined) {
    const base = await getRuleSet(input.basedOnId);
    if (!base || base.groupId !== input.groupId) throw new AuthError("not_found");
  }
  return db.transaction(async (trx) => {
    const stored = await addRuleSetVersion(input.groupId, input.definition, { name: input.name, authorId: user.id, comment: input.comment }, trx);
    await recordAudit(
      {
        groupId: input.groupId,
        userId: user.id,
        action: "rule_set.create",
        entityType: "rule_set",
        entityId: stored.id,
        detail: { version: stored.version, basedOnId: input.basedOnId ?? null, comment: input.comment },
      },
      trx,
    );
    return stored;
  });
}

/**
 * Makes a version the one a site classifies with (lead) and queues the 'reclassify' job that
 * re-labels the site's evenings with it; overrides stay on top. Returns the job id.
 */
export async function activateRuleSet(user: SessionUser, ruleSetId: number, siteId: number): Promise<{ jobId: number; ruleSet: StoredRuleSet }> {
  const { site } = await rulesSite(user, siteId, "lead");
  const ruleSet = await getRuleSet(ruleSetId);
  if (!ruleSet || ruleSet.groupId !== site.groupId) throw new AuthError("not_found");
  const jobId = await db.transaction(async (trx) => {
    await setActiveRuleSet(siteId, ruleSetId, trx);
    const payload: ReclassifyPayload = { ruleSetId };
    const id = await enqueueJob({ kind: RECLASSIFY_JOB, groupId: site.groupId, siteId, payload, createdBy: user.id }, trx);
    await recordAudit(
      {
        groupId: site.groupId,
        userId: user.id,
        action: "rule_set.activate",
        entityType: "site",
        entityId: siteId,
        detail: { ruleSetId, version: ruleSet.version, jobId: id },
      },
      trx,
    );
    return id;
  });
  return { jobId, ruleSet };
}
