import type { Knex } from "knex";

// One saved column mapping per site, offered when the next file is dropped.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("import_templates", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .primary()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.json("template").notNullable();
    t.string("updated_by", 40).nullable();
    t.datetime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("import_templates");
}
