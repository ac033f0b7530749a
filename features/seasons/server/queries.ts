import "server-only";
import { db } from "@/lib/db/knex";
import { AuthError, type SessionUser } from "@/lib/auth/session";
import { isRole } from "@/lib/auth/roles";
import { chiSquareIndependence } from "@/lib/stats/chi-square";
import { LABEL_ORDER, type LabelKey } from "@/lib/ui/label-badge";
import type { Counts, SeasonCell, SeasonQuery, SeasonReport } from "@/features/seasons/schemas";
import { categoriesOf, hemisphereOf, seasonOf, type CustomSeason } from "@/features/seasons/seasons";

type SiteRow = { id: number; group_id: number; name: string; latitude: number };

/**
 * The sites `user` may see among `siteIds`. Any site that does not exist or belongs to a group
 * the person is not in makes the whole request not_found, so nobody learns which ids exist.
 */
export async function visibleSites(user: SessionUser, siteIds: readonly number[]): Promise<SiteRow[]> {
  const unique = [...new Set(siteIds)];
  const rows: Array<SiteRow & { role: string }> = await db("sites as s")
    .join("memberships as m", function () {
      this.on("m.group_id", "=", "s.group_id").andOn("m.user_id", "=", db.raw("?", [user.id]));
    })
    .whereIn("s.id", unique)
    .select("s.id", "s.group_id", "s.name", "s.latitude", "m.role");
  if (rows.length !== unique.length || rows.some((r) => !isRole(r.role))) throw new AuthError("not_found");
  const byId = new Map(rows.map((r) => [r.id, r]));
  return unique.map((id) => byId.get(id)).filter((r): r is SiteRow & { role: string } => r !== undefined);
}

/** Sites of a group for the page's site picker, by name. */
export async function sitesOfGroup(groupId: number): Promise<Array<{ id: number; name: string; latitude: number }>> {
  const rows: Array<{ id: number; name: string; latitude: number }> = await db("sites")
    .where({ group_id: groupId })
    .orderBy("name")
    .select("id", "name", "latitude");
  return rows;
}

const zero = (): Counts => ({ local: 0, stagnant: 0, advective: 0, unclassified: 0 });

type Group = { site_id: number; y: number; m: number; d: number; label: LabelKey; n: number | string };

/**
 * Label counts per season (or month, or a custom season), per year and per site, with a
 * chi-square test of independence between label and season over all chosen sites and years.
 * Final labels (overrides on top) by default; `labels: "auto"` counts the classifier's own.
 */
export async function seasonReport(user: SessionUser, query: SeasonQuery): Promise<SeasonReport> {
  const sites = await visibleSites(user, query.sites);
  const custom: CustomSeason | null =
    query.scheme === "custom" ? { name: query.seasonName, start: query.seasonStart, end: query.seasonEnd } : null;
  const categories = categoriesOf(query.scheme, custom ?? undefined);
  const labelColumn = query.labels === "auto" ? "auto_label" : "final_label";

  // Only a custom season looks at the day of the month; the other schemes need a twelfth of the
  // groups (a site-decade is then about 500 rows instead of 15,000).
  const byDay = query.scheme === "custom";
  const q = db("evenings")
    .whereIn(
      "site_id",
      sites.map((s) => s.id),
    )
    .select(
      "site_id",
      db.raw("YEAR(local_date) AS y"),
      db.raw("MONTH(local_date) AS m"),
      db.raw(byDay ? "DAY(local_date) AS d" : "1 AS d"),
      db.raw(`?? AS label`, [labelColumn]),
      db.raw("COUNT(*) AS n"),
    )
    .groupBy(byDay ? ["site_id", "y", "m", "d", "label"] : ["site_id", "y", "m", "label"]);
  if (query.from) q.where("local_date", ">=", query.from);
  if (query.to) q.where("local_date", "<=", query.to);
  const groups = (await q) as Group[];

  const latitude = new Map(sites.map((s) => [s.id, s.latitude]));
  const cells = new Map<string, SeasonCell>();
  const bump = (siteId: number | null, year: number | null, category: string, label: LabelKey, n: number) => {
    const key = `${siteId ?? "*"}|${year ?? "*"}|${category}`;
    let c = cells.get(key);
    if (!c) cells.set(key, (c = { siteId, year, category, counts: zero(), total: 0 }));
    c.counts[label] += n;
    c.total += n;
  };
  const years = new Set<number>();
  const several = sites.length > 1;
  for (const g of groups) {
    const n = Number(g.n);
    const s = seasonOf(g.y, g.m, g.d, latitude.get(g.site_id) ?? 0, query.scheme, custom ?? undefined);
    years.add(s.year);
    bump(g.site_id, s.year, s.key, g.label, n);
    bump(g.site_id, null, s.key, g.label, n);
    if (several) {
      bump(null, s.year, s.key, g.label, n);
      bump(null, null, s.key, g.label, n);
    }
  }

  const sortedYears = [...years].sort((a, b) => a - b);
  const siteOrder = several ? [null, ...sites.map((s) => s.id)] : sites.map((s) => s.id);
  const ordered: SeasonCell[] = [];
  for (const siteId of siteOrder) {
    for (const year of [...sortedYears, null]) {
      for (const cat of categories) {
        ordered.push(
          cells.get(`${siteId ?? "*"}|${year ?? "*"}|${cat.key}`) ?? { siteId, year, category: cat.key, counts: zero(), total: 0 },
        );
      }
    }
  }

  const overall = ordered.filter((c) => c.year === null && c.siteId === (several ? null : (sites[0]?.id ?? null)));
  const tested = LABEL_ORDER.filter((l) => l !== "unclassified");
  const table = tested.map((label) => categories.map((cat) => overall.find((c) => c.category === cat.key)?.counts[label] ?? 0));
  const chi = chiSquareIndependence(table);

  return {
    from: query.from ?? null,
    to: query.to ?? null,
    labels: query.labels,
    scheme: query.scheme,
    custom,
    sites: sites.map((s) => ({ id: s.id, name: s.name, latitude: s.latitude, hemisphere: hemisphereOf(s.latitude) })),
    categories,
    years: sortedYears,
    cells: ordered,
    test:
      chi.n > 0
        ? {
            labels: [...tested],
            statistic: chi.statistic,
            df: chi.df,
            pValue: chi.pValue,
            n: chi.n,
            smallExpectedShare: chi.smallExpectedShare,
          }
        : null,
  };
}

/** The first and last local date with evenings at the chosen sites, or nulls. */
export async function eveningExtent(siteIds: readonly number[]): Promise<{ from: string | null; to: string | null }> {
  const row: { first: string | null; last: string | null } | undefined = await db("evenings")
    .whereIn("site_id", [...siteIds])
    .first(db.raw("DATE_FORMAT(MIN(local_date), '%Y-%m-%d') AS first"), db.raw("DATE_FORMAT(MAX(local_date), '%Y-%m-%d') AS last"));
  return { from: row?.first ?? null, to: row?.last ?? null };
}
