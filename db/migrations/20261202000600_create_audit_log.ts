import type { Knex } from "knex";

// No foreign keys: the history outlives the users, groups and rows it mentions.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("audit_log", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.integer("group_id").unsigned().nullable();
    t.string("user_id", 40).nullable();
    t.string("action", 60).notNullable();
    t.string("entity_type", 40).notNullable();
    t.string("entity_id", 64).notNullable();
    t.json("detail").nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["group_id", "created_at"]);
    t.index(["entity_type", "entity_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("audit_log");
}
