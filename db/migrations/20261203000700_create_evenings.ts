import type { Knex } from "knex";

const LABELS = ["local", "stagnant", "advective", "unclassified"];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("evenings", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.date("local_date").notNullable();
    t.datetime("sunset_utc").nullable();
    t.datetime("civil_dusk_utc").nullable();
    t.enum("auto_label", LABELS).notNullable();
    t.string("rule", 60).nullable();
    t.json("reasons").notNullable();
    t.json("margins").notNullable();
    t.json("metrics").notNullable();
    // copied out of metrics so charts and filters need not parse JSON
    t.double("sigma_w_evening").nullable();
    t.double("ws_evening").nullable();
    t.integer("rule_set_id")
      .unsigned()
      .nullable()
      .references("id")
      .inTable("rule_sets")
      .onDelete("SET NULL");
    t.integer("rule_set_version").unsigned().nullable();
    t.datetime("computed_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.enum("final_label", LABELS).notNullable();
    t.enum("label_source", ["auto", "override"]).notNullable().defaultTo("auto");
    t.text("override_note").nullable();
    t.boolean("reviewed").notNullable().defaultTo(false);
    t.string("reviewed_by", 40).nullable();
    t.datetime("reviewed_at", { precision: 3 }).nullable();
    // optimistic concurrency: every change bumps it
    t.integer("version").unsigned().notNullable().defaultTo(1);
    t.unique(["site_id", "local_date"]);
    t.index(["site_id", "final_label"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("evenings");
}
