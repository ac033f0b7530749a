import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("research_groups", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.increments("id").unsigned().primary();
    t.string("name", 120).notNullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("research_groups");
}
