import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("memberships", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.string("user_id", 40).notNullable().references("id").inTable("users").onDelete("CASCADE");
    t.integer("group_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("research_groups")
      .onDelete("CASCADE");
    t.enum("role", ["lead", "analyst", "viewer"]).notNullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.primary(["user_id", "group_id"]);
    t.index(["group_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("memberships");
}
