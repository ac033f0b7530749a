import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("sites", (t) => {
    t.integer("active_rule_set_id")
      .unsigned()
      .nullable()
      .references("id")
      .inTable("rule_sets")
      .onDelete("SET NULL");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("sites", (t) => {
    t.dropForeign(["active_rule_set_id"]);
    t.dropColumn("active_rule_set_id");
  });
}
