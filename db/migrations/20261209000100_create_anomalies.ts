import type { Knex } from "knex";

const LABELS = ["local", "stagnant", "advective", "unclassified"];

// An anomaly points at its evening instead of copying the label, so a page always shows the
// evening's current final label (reclassification and overrides included); the label seen at
// detection is kept beside it for the record.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("anomalies", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.integer("site_id").unsigned().notNullable().references("id").inTable("sites").onDelete("CASCADE");
    t.bigInteger("evening_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("evenings")
      .onDelete("CASCADE");
    t.string("series", 40).notNullable();
    t.enum("kind", ["rise-after-sunset", "rise-before-sunset", "drop", "spike"]).notNullable();
    t.datetime("start_utc").notNullable();
    t.datetime("end_utc").notNullable();
    t.double("peak_score").notNullable();
    t.double("peak_value").nullable();
    t.double("baseline_value").nullable();
    t.smallint("periods").unsigned().notNullable();
    t.enum("label_at_detection", LABELS).nullable();
    t.integer("rule_set_version").unsigned().nullable();
    t.datetime("detected_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["site_id", "start_utc"]);
    t.index(["evening_id"]);
    t.index(["site_id", "series", "kind"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("anomalies");
}
