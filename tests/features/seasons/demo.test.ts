import { beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { DEMO_ACCOUNTS, DEMO_GROUP_NAME, DEMO_SITE } from "@/lib/demo/scenario";
import type { SessionUser } from "@/lib/auth/session";
import type { LabelKey } from "@/lib/ui/label-badge";
import { seedDemoData } from "@/db/seeds/02_demo_data";
import { seasonQuerySchema } from "@/features/seasons/schemas";
import { seasonReport } from "@/features/seasons/server/queries";

// The demo scenario's synthetic two years, as `npm run db:seed` stores them.
describe("season counts on the demo data", () => {
  let lead: SessionUser;
  let siteId: number;

  beforeAll(async () => {
    await seedDemoData(db);
    const email = DEMO_ACCOUNTS.find((a) => a.role === "lead")?.email ?? "";
    const u: { id: string; email: string; display_name: string } = await db("users").where({ email }).first("id", "email", "display_name");
    lead = { id: u.id, email: u.email, displayName: u.display_name };
    const g: { id: number } = await db("research_groups").where({ name: DEMO_GROUP_NAME }).first("id");
    const s: { id: number } = await db("sites").where({ group_id: g.id, name: DEMO_SITE.name }).first("id");
    siteId = s.id;
  }, 600_000);

  test("every season and label matches a direct SQL count", async () => {
    const report = await seasonReport(lead, seasonQuerySchema.parse({ sites: String(siteId) }));
    const [rows] = (await db.raw(
      `SELECT CASE WHEN MONTH(local_date) IN (12, 1, 2) THEN 'winter' WHEN MONTH(local_date) IN (3, 4, 5) THEN 'spring'
                   WHEN MONTH(local_date) IN (6, 7, 8) THEN 'summer' ELSE 'autumn' END AS season,
              final_label AS label, COUNT(*) AS n
         FROM evenings WHERE site_id = ? GROUP BY season, label`,
      [siteId],
    )) as [Array<{ season: string; label: LabelKey; n: number }>];
    expect(rows.length).toBeGreaterThan(0);
    const northern = report.sites[0]?.hemisphere === "north";
    expect(northern).toBe(DEMO_SITE.latitude >= 0);
    for (const season of ["winter", "spring", "summer", "autumn"]) {
      const cell = report.cells.find((c) => c.siteId === siteId && c.year === null && c.category === season);
      for (const label of ["local", "stagnant", "advective", "unclassified"] as const) {
        const want = Number(rows.find((r) => r.season === season && r.label === label)?.n ?? 0);
        expect(cell?.counts[label], `${season} ${label}`).toBe(want);
      }
    }
    const [[all]] = (await db.raw("SELECT COUNT(*) AS n FROM evenings WHERE site_id = ?", [siteId])) as [[{ n: number }]];
    expect(report.cells.filter((c) => c.siteId === siteId && c.year === null).reduce((a, c) => a + c.total, 0)).toBe(Number(all.n));
    expect(report.test?.df).toBe(6);
  });
});
