import type { Knex } from "knex";

// Column names are the ones @lucia-auth/adapter-mysql reads and writes.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("user_sessions", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.string("id", 255).primary();
    t.string("user_id", 40).notNullable().references("id").inTable("users").onDelete("CASCADE");
    t.datetime("expires_at", { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("user_sessions");
}
