import "server-only";
import { db } from "@/lib/db/knex";
import { jsonColumn } from "@/lib/db/json";
import type { SessionUser } from "@/lib/auth/session";
import type { RuleSetSummary } from "@/features/rules/schemas";
import { groupRole } from "@/features/rules/server/access";

type Row = {
  id: number;
  version: number;
  name: string;
  comment: string | null;
  author_name: string | null;
  created_at: Date;
  definition: unknown;
};

/** Every version of a group's rules, newest first, with its use (evenings labelled, active sites). */
export async function listRuleSets(user: SessionUser, groupId: number): Promise<RuleSetSummary[]> {
  await groupRole(user, groupId, "viewer");
  const rows: Row[] = await db("rule_sets as r")
    .leftJoin("users as u", "u.id", "r.author_id")
    .where("r.group_id", groupId)
    .orderBy("r.version", "desc")
    .select("r.id", "r.version", "r.name", "r.comment", "u.display_name as author_name", "r.created_at", "r.definition");
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const used: Array<{ rule_set_id: number; n: number | string }> = await db("evenings")
    .whereIn("rule_set_id", ids)
    .groupBy("rule_set_id")
    .select("rule_set_id", db.raw("COUNT(*) AS n"));
  const active: Array<{ id: number; name: string; active_rule_set_id: number }> = await db("sites")
    .where({ group_id: groupId })
    .whereIn("active_rule_set_id", ids)
    .orderBy("name")
    .select("id", "name", "active_rule_set_id");
  return rows.map((r) => ({
    id: r.id,
    version: r.version,
    name: r.name,
    comment: r.comment,
    author: r.author_name,
    createdAt: r.created_at.toISOString(),
    eveningsLabelled: Number(used.find((u) => u.rule_set_id === r.id)?.n ?? 0),
    activeOn: active.filter((s) => s.active_rule_set_id === r.id).map((s) => ({ id: s.id, name: s.name })),
    definition: jsonColumn(r.definition),
  }));
}

/** Sites of a group with the version each classifies with, by name. */
export async function sitesWithRules(
  groupId: number,
): Promise<Array<{ id: number; name: string; activeRuleSetId: number | null; activeVersion: number | null }>> {
  const rows: Array<{ id: number; name: string; active_rule_set_id: number | null; version: number | null }> = await db("sites as s")
    .leftJoin("rule_sets as r", "r.id", "s.active_rule_set_id")
    .where("s.group_id", groupId)
    .orderBy("s.name")
    .select("s.id", "s.name", "s.active_rule_set_id", "r.version");
  return rows.map((r) => ({ id: r.id, name: r.name, activeRuleSetId: r.active_rule_set_id, activeVersion: r.version }));
}
