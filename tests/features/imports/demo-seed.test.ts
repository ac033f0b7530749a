/*
 * The demo scenario's SYNTHETIC two-year data set goes through the import pipeline, shows all
 * three kinds of evening and its outages, and a second seeding changes nothing.
 */
import { expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { DEMO_GROUP_NAME, DEMO_SITE } from "@/lib/demo/scenario";
import { DEMO_FILE_NAME, seedDemoData } from "@/db/seeds/02_demo_data";

test("the demo data seed imports once, classifies, and is idempotent", { timeout: 300_000 }, async () => {
  await seedDemoData(db);
  const group = await db<{ id: number; name: string }>("research_groups").where({ name: DEMO_GROUP_NAME }).first("id");
  const site = await db<{ id: number; group_id: number; name: string }>("sites").where({ group_id: group?.id ?? -1, name: DEMO_SITE.name }).first("id");
  const siteId = site?.id ?? -1;
  const imports = await db("imports").where({ site_id: siteId, original_name: DEMO_FILE_NAME }).select("status", "rows_written");
  expect(imports).toHaveLength(1);
  expect(imports[0]).toMatchObject({ status: "landed" });
  const rows = Number((await db("half_hours").where({ site_id: siteId }).count({ n: "*" }).first())?.n);
  // 731 days minus two outages of 5 and 4 days, 48 half-hours a day.
  expect(rows).toBe((731 - 9) * 48);
  const labels = await db<{ site_id: number; auto_label: string }>("evenings").where({ site_id: siteId }).distinct("auto_label");
  expect(labels.map((l) => l.auto_label)).toEqual(expect.arrayContaining(["local", "stagnant", "advective", "unclassified"]));

  await seedDemoData(db);
  expect(Number((await db("half_hours").where({ site_id: siteId }).count({ n: "*" }).first())?.n)).toBe(rows);
  expect(await db("imports").where({ site_id: siteId }).count({ n: "*" }).first()).toEqual({ n: 1 });
});
