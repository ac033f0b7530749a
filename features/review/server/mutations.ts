import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { recordAudit } from "@/lib/db/audit";
import type { SessionUser } from "@/lib/auth/session";
import type {
  ConflictBody,
  EveningSummary,
  Label,
  OverrideInput,
  ReviewedInput,
  RevertInput,
} from "@/features/review/schemas";
import { eveningAccess } from "@/features/review/server/access";
import { listEvenings } from "@/features/review/server/queries";

/*
 * Label changes. Each checks the caller's role, locks the evening row, compares the version the
 * caller saw (optimistic concurrency: the second of two people gets a conflict showing the newer
 * label, nothing is overwritten), then bumps the version and appends one evening_events row and
 * one audit_log row in the same transaction.
 */

export type ReviewMutationResult =
  | { ok: true; evening: EveningSummary }
  | { ok: false; status: 409; body: ConflictBody }
  | { ok: false; status: 422; code: string; message: string };

type Locked = {
  id: number;
  site_id: number;
  date: string;
  auto_label: Label;
  final_label: Label;
  label_source: "auto" | "override";
  version: number;
  rule_set_version: number | null;
};

const LABEL_WORDS: Record<Label, string> = {
  local: "locally driven",
  stagnant: "stagnant",
  advective: "advective",
  unclassified: "unclassified",
};

async function lock(trx: Knex.Transaction, eveningId: number): Promise<Locked> {
  const row: Locked | undefined = await trx("evenings")
    .where({ id: eveningId })
    .forUpdate()
    .first(
      "id",
      "site_id",
      trx.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS date"),
      "auto_label",
      "final_label",
      "label_source",
      "version",
      "rule_set_version",
    );
  if (!row) throw new Error(`evening ${eveningId} vanished`);
  return row;
}

async function conflict(trx: Knex.Transaction, row: Locked): Promise<ReviewMutationResult> {
  const last: { display_name: string | null } | undefined = await trx("evening_events as v")
    .leftJoin("users as u", "u.id", "v.user_id")
    .where("v.evening_id", row.id)
    .whereNot("v.kind", "auto")
    .orderBy("v.id", "desc")
    .first("u.display_name");
  const by = last?.display_name ?? null;
  return {
    ok: false,
    status: 409,
    body: {
      error: {
        code: "conflict",
        message: `Someone changed this evening while you were looking at it${by ? ` (${by})` : ""}: it is now labelled ${LABEL_WORDS[row.final_label]}${row.label_source === "override" ? " by a person" : " by the rules"}. Nothing was saved; look again and try once more if you still disagree.`,
        current: { label: row.final_label, source: row.label_source, version: row.version, by },
      },
    },
  };
}

async function fresh(eveningId: number, siteId: number, date: string): Promise<EveningSummary> {
  const [e] = await listEvenings(siteId, { from: date, to: date });
  if (!e || e.id !== eveningId) throw new Error(`evening ${eveningId} vanished after update`);
  return e;
}

async function audit(
  trx: Knex.Transaction,
  groupId: number,
  user: SessionUser,
  action: string,
  id: number,
  detail: Record<string, unknown>,
) {
  await recordAudit({ groupId, userId: user.id, action, entityType: "evening", entityId: id, detail }, trx);
}

/** Sets a person's label with a note (analyst or lead). */
export async function overrideEvening(
  user: SessionUser,
  eveningId: number,
  input: OverrideInput,
): Promise<ReviewMutationResult> {
  const { site } = await eveningAccess(user, eveningId, "analyst");
  const outcome = await db.transaction(async (trx): Promise<ReviewMutationResult | Locked> => {
    const row = await lock(trx, eveningId);
    if (row.version !== input.version) return conflict(trx, row);
    if (row.final_label === input.label) {
      return {
        ok: false,
        status: 422,
        code: "unchanged",
        message: `The evening is already labelled ${LABEL_WORDS[input.label]}; choose a different label, or mark it reviewed.`,
      };
    }
    await trx("evenings")
      .where({ id: eveningId })
      .update({
        final_label: input.label,
        label_source: "override",
        override_note: input.note,
        reviewed: true,
        reviewed_by: user.id,
        reviewed_at: trx.fn.now(3),
        version: row.version + 1,
      });
    await trx("evening_events").insert({
      evening_id: eveningId,
      kind: "override",
      from_label: row.final_label,
      to_label: input.label,
      note: input.note,
      user_id: user.id,
      rule_set_version: row.rule_set_version,
    });
    await audit(trx, site.groupId, user, "evening.override", eveningId, {
      from: row.final_label,
      to: input.label,
      note: input.note,
    });
    return row;
  });
  if ("ok" in outcome) return outcome;
  return { ok: true, evening: await fresh(eveningId, outcome.site_id, outcome.date) };
}

/** Returns an overridden evening to its automatic label (lead only); the revert is recorded too. */
export async function revertEvening(
  user: SessionUser,
  eveningId: number,
  input: RevertInput,
): Promise<ReviewMutationResult> {
  const { site } = await eveningAccess(user, eveningId, "lead");
  const outcome = await db.transaction(async (trx): Promise<ReviewMutationResult | Locked> => {
    const row = await lock(trx, eveningId);
    if (row.version !== input.version) return conflict(trx, row);
    if (row.label_source === "auto") {
      return {
        ok: false,
        status: 422,
        code: "unchanged",
        message: "The evening already carries its automatic label.",
      };
    }
    await trx("evenings")
      .where({ id: eveningId })
      .update({
        final_label: row.auto_label,
        label_source: "auto",
        override_note: null,
        version: row.version + 1,
      });
    await trx("evening_events").insert({
      evening_id: eveningId,
      kind: "revert",
      from_label: row.final_label,
      to_label: row.auto_label,
      note: input.note ?? null,
      user_id: user.id,
      rule_set_version: row.rule_set_version,
    });
    await audit(trx, site.groupId, user, "evening.revert", eveningId, {
      from: row.final_label,
      to: row.auto_label,
      note: input.note ?? null,
    });
    return row;
  });
  if ("ok" in outcome) return outcome;
  return { ok: true, evening: await fresh(eveningId, outcome.site_id, outcome.date) };
}

/** Marks an evening as looked at by a person (analyst or lead). Marking twice changes nothing. */
export async function markReviewed(
  user: SessionUser,
  eveningId: number,
  input: ReviewedInput,
): Promise<ReviewMutationResult> {
  await eveningAccess(user, eveningId, "analyst");
  const outcome = await db.transaction(async (trx): Promise<ReviewMutationResult | Locked> => {
    const row = await lock(trx, eveningId);
    const already: { reviewed: number } = await trx("evenings").where({ id: eveningId }).first("reviewed");
    if (already.reviewed) return row;
    if (row.version !== input.version) return conflict(trx, row);
    await trx("evenings")
      .where({ id: eveningId })
      .update({ reviewed: true, reviewed_by: user.id, reviewed_at: trx.fn.now(3), version: row.version + 1 });
    await trx("evening_events").insert({
      evening_id: eveningId,
      kind: "reviewed",
      from_label: row.final_label,
      to_label: row.final_label,
      user_id: user.id,
      rule_set_version: row.rule_set_version,
    });
    return row;
  });
  if ("ok" in outcome) return outcome;
  return { ok: true, evening: await fresh(eveningId, outcome.site_id, outcome.date) };
}
