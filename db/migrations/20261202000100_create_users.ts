import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("users", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    // lucia string ids
    t.string("id", 40).primary();
    // stored lower-case so the unique index is case-insensitive by construction
    t.string("email", 255).notNullable().unique();
    t.string("display_name", 120).notNullable();
    t.string("password_hash", 255).notNullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("users");
}
