import "server-only";
import { db } from "@/lib/db/knex";
import { AuthError, type SessionUser } from "@/lib/auth/session";
import { isRole } from "@/lib/auth/roles";
import { cohensKappa } from "@/lib/stats/kappa";
import { LABEL_ORDER, type LabelKey } from "@/lib/ui/label-badge";
import type { AgreementReport } from "@/features/agreement/schemas";

/** The site if `user` is in its group (any role); otherwise not_found. */
export async function agreementSite(user: SessionUser, siteId: number): Promise<{ id: number; name: string; groupId: number }> {
  const s: { id: number; name: string; group_id: number } | undefined = await db("sites").where({ id: siteId }).first("id", "name", "group_id");
  if (!s) throw new AuthError("not_found");
  const m: { role: string } | undefined = await db("memberships").where({ user_id: user.id, group_id: s.group_id }).first("role");
  if (!m || !isRole(m.role)) throw new AuthError("not_found");
  return { id: s.id, name: s.name, groupId: s.group_id };
}

type Period = { from?: string; to?: string };

function scoped(siteId: number, p: Period) {
  const q = db("evenings").where({ site_id: siteId });
  if (p.from) q.andWhere("local_date", ">=", p.from);
  if (p.to) q.andWhere("local_date", "<=", p.to);
  return q;
}

/**
 * Automatic against final labels of a site's evenings: the confusion table, overall agreement and
 * Cohen's kappa (final labels are the analysts' where they overrode, so the table measures how
 * often the rules and the analysts agree).
 */
export async function agreementReport(user: SessionUser, siteId: number, p: Period = {}): Promise<AgreementReport> {
  await agreementSite(user, siteId);
  const rows: Array<{ auto_label: LabelKey; final_label: LabelKey; n: number | string; o: number | string }> = await scoped(siteId, p)
    .groupBy("auto_label", "final_label")
    .select("auto_label", "final_label", db.raw("COUNT(*) AS n"), db.raw("SUM(label_source = 'override') AS o"));
  const labels = [...LABEL_ORDER];
  const counts = labels.map((a) => labels.map((f) => Number(rows.find((r) => r.auto_label === a && r.final_label === f)?.n ?? 0)));
  const k = cohensKappa(counts);
  return {
    siteId,
    from: p.from ?? null,
    to: p.to ?? null,
    labels,
    counts,
    n: k.n,
    overrides: rows.reduce((s, r) => s + Number(r.o ?? 0), 0),
    observed: k.observed,
    expected: k.expected,
    kappa: k.kappa,
  };
}

/** The evenings behind one cell of the table, by date (at most `limit`). */
export async function cellEvenings(
  user: SessionUser,
  siteId: number,
  auto: LabelKey,
  final: LabelKey,
  p: Period = {},
  limit = 500,
): Promise<Array<{ id: number; date: string; note: string | null; source: "auto" | "override" }>> {
  await agreementSite(user, siteId);
  const rows: Array<{ id: number; date: string; override_note: string | null; label_source: "auto" | "override" }> = await scoped(siteId, p)
    .andWhere({ auto_label: auto, final_label: final })
    .orderBy("local_date")
    .limit(limit)
    .select("id", db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS date"), "override_note", "label_source");
  return rows.map((r) => ({ id: Number(r.id), date: r.date, note: r.override_note, source: r.label_source }));
}
