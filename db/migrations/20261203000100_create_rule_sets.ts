import type { Knex } from "knex";

// Rule sets are versioned per group and never edited in place: a change is a new version,
// so every stored evening can name the exact rules that labelled it.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("rule_sets", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.increments("id").unsigned().primary();
    t.integer("group_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("research_groups")
      .onDelete("CASCADE");
    t.integer("version").unsigned().notNullable();
    t.string("name", 120).notNullable();
    t.json("definition").notNullable();
    // no foreign key: the history outlives the user who wrote it
    t.string("author_id", 40).nullable();
    t.text("comment").nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["group_id", "version"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("rule_sets");
}
