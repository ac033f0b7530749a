import type { Knex } from "knex";

// Only the SHA-256 of a token's secret is stored; the secret is shown once at creation.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("api_tokens", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.increments("id").unsigned().primary();
    t.string("user_id", 40)
      .notNullable()
      .references("id")
      .inTable("users")
      .onDelete("CASCADE");
    t.string("name", 80).notNullable();
    t.specificType("token_hash", "char(64)").notNullable().unique();
    t.datetime("last_used_at", { precision: 3 }).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime("revoked_at", { precision: 3 }).nullable();
    t.index(["user_id", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("api_tokens");
}
