import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("password_resets", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.string("user_id", 40).notNullable().references("id").inTable("users").onDelete("CASCADE");
    // sha256 of the secret in the link; the secret itself is never stored.
    t.specificType("token_hash", "char(64)").notNullable().unique();
    t.datetime("expires_at", { precision: 3 }).notNullable();
    t.datetime("used_at", { precision: 3 }).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["user_id", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("password_resets");
}
