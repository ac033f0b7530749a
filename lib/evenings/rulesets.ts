import "server-only";
import type { Knex } from "knex";
import { DEFAULT_RULE_SET, parseRuleSet, type RuleSet } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import type { RuleSetRow } from "@/lib/db/tables";
import { jsonColumn } from "@/lib/db/json";

/** A stored, versioned rule set of a group. `definition.version` equals `version`. */
export interface StoredRuleSet {
  id: number;
  groupId: number;
  version: number;
  name: string;
  definition: RuleSet;
  authorId: string | null;
  comment: string | null;
  createdAt: Date;
}

type Row = RuleSetRow;

type Db = Knex | Knex.Transaction;

function toStored(r: Row): StoredRuleSet {
  const definition = parseRuleSet(jsonColumn(r.definition));
  return {
    id: r.id,
    groupId: r.group_id,
    version: r.version,
    name: r.name,
    definition: { ...definition, version: r.version },
    authorId: r.author_id,
    comment: r.comment,
    createdAt: r.created_at,
  };
}

/** One stored rule set by id, or null. */
export async function getRuleSet(id: number, conn: Db = db): Promise<StoredRuleSet | null> {
  const row = await conn("rule_sets").where({ id }).first<Row | undefined>();
  return row ? toStored(row) : null;
}

/** The rule set a site classifies with, or null when none was chosen yet (see ensureActiveRuleSet). */
export async function getActiveRuleSet(siteId: number, conn: Db = db): Promise<StoredRuleSet | null> {
  const [rows] = (await conn.raw(
    "SELECT r.* FROM sites s JOIN rule_sets r ON r.id = s.active_rule_set_id WHERE s.id = ?",
    [siteId],
  )) as [Row[]];
  const row = rows[0];
  return row ? toStored(row) : null;
}

/**
 * Adds the next version of a group's rule set (not activated anywhere). The definition is
 * validated with parseRuleSet; its own `version` is replaced by the stored one.
 */
export async function addRuleSetVersion(
  groupId: number,
  definition: unknown,
  meta: { name?: string; authorId?: string | null; comment?: string | null } = {},
  trx?: Knex.Transaction,
): Promise<StoredRuleSet> {
  const parsed = parseRuleSet(definition);
  const run = async (t: Knex.Transaction) => {
    // The group row serialises version numbers of concurrent writers.
    const [groups] = (await t.raw("SELECT id FROM research_groups WHERE id = ? FOR UPDATE", [groupId])) as [Array<{ id: number }>];
    if (!groups[0]) throw new Error(`no research group ${groupId}`);
    // a locking read sees the newest committed versions, whatever snapshot the transaction holds
    const [last] = (await t.raw("SELECT MAX(version) AS v FROM rule_sets WHERE group_id = ? FOR UPDATE", [groupId])) as [
      Array<{ v: number | null }>,
    ];
    const version = (last[0]?.v ?? 0) + 1;
    const [id] = await t("rule_sets").insert({
      group_id: groupId,
      version,
      name: (meta.name ?? parsed.name).slice(0, 120),
      definition: JSON.stringify({ ...parsed, version }),
      author_id: meta.authorId ?? null,
      comment: meta.comment ?? null,
    });
    return (await getRuleSet(Number(id), t)) as StoredRuleSet;
  };
  return trx ? run(trx) : db.transaction(run);
}

/** Makes `ruleSetId` (a rule set of the site's own group) the one the site classifies with. */
export async function setActiveRuleSet(siteId: number, ruleSetId: number, conn: Db = db): Promise<void> {
  const [res] = (await conn.raw(
    `UPDATE sites s JOIN rule_sets r ON r.group_id = s.group_id AND r.id = ?
        SET s.active_rule_set_id = r.id WHERE s.id = ?`,
    [ruleSetId, siteId],
  )) as [{ affectedRows: number }];
  if (res.affectedRows === 0) throw new Error(`rule set ${ruleSetId} does not belong to the group of site ${siteId}`);
}

/**
 * The site's active rule set, choosing one when there is none: the group's newest version, or,
 * for a group without rule sets, DEFAULT_RULE_SET stored as version 1. Safe under concurrency.
 */
export async function ensureActiveRuleSet(siteId: number, trx?: Knex.Transaction): Promise<StoredRuleSet> {
  const active = await getActiveRuleSet(siteId, trx ?? db);
  if (active) return active;
  const run = async (t: Knex.Transaction) => {
    // Locking reads throughout: they see what concurrent callers committed meanwhile.
    const [sites] = (await t.raw("SELECT group_id, active_rule_set_id FROM sites WHERE id = ? FOR UPDATE", [siteId])) as [
      Array<{ group_id: number; active_rule_set_id: number | null }>,
    ];
    const site = sites[0];
    if (!site) throw new Error(`no site ${siteId}`);
    if (site.active_rule_set_id !== null) {
      const again = (await t.raw("SELECT * FROM rule_sets WHERE id = ? LOCK IN SHARE MODE", [site.active_rule_set_id])) as [Row[]];
      if (again[0][0]) return toStored(again[0][0]);
    }
    await t.raw("SELECT id FROM research_groups WHERE id = ? FOR UPDATE", [site.group_id]);
    const [newestRows] = (await t.raw(
      "SELECT * FROM rule_sets WHERE group_id = ? ORDER BY version DESC LIMIT 1 LOCK IN SHARE MODE",
      [site.group_id],
    )) as [Row[]];
    const newest = newestRows[0];
    const chosen = newest
      ? toStored(newest)
      : await addRuleSetVersion(site.group_id, DEFAULT_RULE_SET, { comment: "Default rule set, added automatically." }, t);
    await setActiveRuleSet(siteId, chosen.id, t);
    return chosen;
  };
  return trx ? run(trx) : db.transaction(run);
}
