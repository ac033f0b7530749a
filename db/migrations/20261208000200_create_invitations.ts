import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("invitations", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.integer("group_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("research_groups")
      .onDelete("CASCADE");
    t.string("email", 255).notNullable();
    t.enum("role", ["lead", "analyst", "viewer"]).notNullable();
    // sha256 of the secret in the link; the secret itself is never stored.
    t.specificType("token_hash", "char(64)").notNullable().unique();
    t.string("invited_by", 40).nullable().references("id").inTable("users").onDelete("SET NULL");
    t.datetime("expires_at", { precision: 3 }).notNullable();
    t.datetime("sent_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime("accepted_at", { precision: 3 }).nullable();
    t.string("accepted_by", 40).nullable().references("id").inTable("users").onDelete("SET NULL");
    t.datetime("revoked_at", { precision: 3 }).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["group_id", "email"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("invitations");
}
