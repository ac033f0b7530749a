import type { Knex } from "knex";

// One row per site, season-year and season ("year" for the annual maximum that the
// weak-turbulence flags apply), with the bootstrap spread.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("ustar_thresholds", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.increments("id").unsigned().primary();
    t.integer("site_id").unsigned().notNullable().references("id").inTable("sites").onDelete("CASCADE");
    t.smallint("season_year").notNullable();
    t.enum("season", ["winter", "spring", "summer", "autumn", "year"]).notNullable();
    t.string("flux_series", 40).notNullable().defaultTo("FC");
    t.double("threshold_ms").nullable();
    t.integer("points").unsigned().notNullable().defaultTo(0);
    t.tinyint("temperature_classes_used").unsigned().notNullable().defaultTo(0);
    t.smallint("bootstrap_resamples").unsigned().notNullable().defaultTo(0);
    t.smallint("bootstrap_found").unsigned().notNullable().defaultTo(0);
    t.double("p05_ms").nullable();
    t.double("p50_ms").nullable();
    t.double("p95_ms").nullable();
    t.double("sd_ms").nullable();
    t.datetime("computed_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["site_id", "season_year", "season"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("ustar_thresholds");
}
