import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("sign_in_attempts", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.string("email", 255).notNullable();
    t.string("ip", 64).notNullable();
    t.boolean("succeeded").notNullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["email", "created_at"]);
    t.index(["ip", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("sign_in_attempts");
}
