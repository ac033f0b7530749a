import type { Knex } from "knex";

const LABELS = ["local", "stagnant", "advective", "unclassified"];

// Append-only: the history of how an evening's label came to be.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("evening_events", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.bigInteger("evening_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("evenings")
      .onDelete("CASCADE");
    t.enum("kind", ["auto", "override", "revert", "reviewed"]).notNullable();
    t.enum("from_label", LABELS).nullable();
    t.enum("to_label", LABELS).nullable();
    t.text("note").nullable();
    t.string("user_id", 40).nullable();
    t.integer("rule_set_version").unsigned().nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["evening_id", "id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("evening_events");
}
