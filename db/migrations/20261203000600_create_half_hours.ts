import type { Knex } from "knex";

/** Canonical columns in lib/series/types.ts order, snake_case. */
const MEASURES = [
  "ws",
  "wd",
  "ustar",
  "w_sigma",
  "h",
  "le",
  "ta",
  "pa",
  "rh",
  "vpd",
  "zl",
  "mo_length",
  "fc",
  "co2",
  "sw_in",
] as const;

// Wide and narrow on purpose: one row per period, clustered by (site, time), so reading an
// evening window or a year is a single range scan. NULL = missing.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("half_hours", (t) => {
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.datetime("start_utc").notNullable();
    // no foreign key: deleting an import deletes its rows explicitly, and the check would
    // slow the bulk writes
    t.bigInteger("import_id").unsigned().nullable();
    for (const m of MEASURES) t.double(m).nullable();
    for (let i = 1; i <= 8; i++) t.double(`tracer_${i}`).nullable();
    t.primary(["site_id", "start_utc"]);
    t.index(["import_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("half_hours");
}
