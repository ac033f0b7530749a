import type { Knex } from "knex";

/** Value columns of half_hours at this migration: a period is present when one of them holds a value. */
const VALUE_COLUMNS = [
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
  ...Array.from({ length: 8 }, (_, i) => `tracer_${i + 1}`),
];

// One small row per site so the site list need not scan every stored period on each load. The
// import write keeps it true in the transaction that writes or deletes the site's half_hours
// (features/imports/server/write.ts); the backfill below covers data stored before it existed.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("site_coverage", (t) => {
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .primary()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    // signed on purpose: the write adds and subtracts deltas
    t.integer("stored_half_hours").notNullable().defaultTo(0);
    t.integer("present_half_hours").notNullable().defaultTo(0);
    t.datetime("first_start_utc").nullable();
    t.datetime("last_start_utc").nullable();
  });
  await knex.raw(
    `INSERT INTO site_coverage (site_id, stored_half_hours, present_half_hours, first_start_utc, last_start_utc)
     SELECT site_id, COUNT(*), COUNT(COALESCE(${VALUE_COLUMNS.join(", ")})), MIN(start_utc), MAX(start_utc)
       FROM half_hours GROUP BY site_id`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("site_coverage");
}
