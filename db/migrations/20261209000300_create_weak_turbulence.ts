import type { Knex } from "knex";

// Per evening rather than per half-hour: the night's flux periods below the u* threshold are
// counted, with the first and last of them, which is what pages and exports need.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("weak_turbulence", (t) => {
    t.bigInteger("evening_id")
      .unsigned()
      .notNullable()
      .primary()
      .references("id")
      .inTable("evenings")
      .onDelete("CASCADE");
    t.integer("site_id").unsigned().notNullable().references("id").inTable("sites").onDelete("CASCADE");
    t.string("flux_series", 40).notNullable().defaultTo("FC");
    t.double("threshold_ms").notNullable();
    t.smallint("night_periods").unsigned().notNullable();
    t.smallint("weak_periods").unsigned().notNullable();
    t.datetime("first_weak_utc").nullable();
    t.datetime("last_weak_utc").nullable();
    t.datetime("computed_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["site_id", "weak_periods"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("weak_turbulence");
}
