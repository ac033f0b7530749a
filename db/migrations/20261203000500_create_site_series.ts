import type { Knex } from "knex";

// Tracers (O3, isoprene, ...) are stored in the fixed tracer_1..tracer_8 columns of
// half_hours; this table says which slot holds which named series at a site.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("site_series", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.tinyint("slot").unsigned().notNullable();
    t.string("name", 40).notNullable();
    t.string("unit", 32).notNullable();
    t.enum("kind", ["concentration", "flux"]).notNullable();
    t.primary(["site_id", "slot"]);
    t.unique(["site_id", "name"]);
  });
  await knex.raw(
    "ALTER TABLE site_series ADD CONSTRAINT site_series_slot_range CHECK (slot BETWEEN 1 AND 8)",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("site_series");
}
