import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("sites", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.increments("id").unsigned().primary();
    t.integer("group_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("research_groups")
      .onDelete("CASCADE");
    t.string("name", 120).notNullable();
    t.double("latitude").notNullable();
    t.double("longitude").notNullable();
    t.double("elevation_m").notNullable();
    t.double("measurement_height_m").notNullable();
    t.double("canopy_height_m").notNullable();
    t.double("displacement_height_m").nullable();
    // the offset of the data logger's clock (standard time, no daylight saving)
    t.decimal("utc_offset_hours", 4, 2).notNullable();
    t.text("notes").nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime("updated_at", { precision: 3 })
      .notNullable()
      .defaultTo(knex.raw("CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3)"));
    t.unique(["group_id", "name"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("sites");
}
