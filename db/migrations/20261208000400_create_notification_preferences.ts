import type { Knex } from "knex";

// One row per person who changed a setting; without a row the defaults below apply.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("notification_preferences", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.string("user_id", 40).primary().references("id").inTable("users").onDelete("CASCADE");
    t.boolean("import_notices").notNullable().defaultTo(true);
    t.boolean("weekly_digest").notNullable().defaultTo(false);
    t.datetime("updated_at", { precision: 3 })
      .notNullable()
      .defaultTo(knex.raw("CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3)"));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("notification_preferences");
}
