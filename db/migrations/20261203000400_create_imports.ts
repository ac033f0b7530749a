import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("imports", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.integer("site_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.specificType("sha256", "char(64)").notNullable();
    t.string("original_name", 255).notNullable();
    t.bigInteger("size_bytes").unsigned().notNullable();
    t.string("storage_key", 255).notNullable();
    t.json("mapping").nullable();
    t.json("options").nullable();
    t.enum("status", [
      "pending",
      "queued",
      "running",
      "landed",
      "failed",
      "refused",
      "deleted",
      "purged",
    ])
      .notNullable()
      .defaultTo("pending");
    t.bigInteger("job_id")
      .unsigned()
      .nullable()
      .references("id")
      .inTable("jobs")
      .onDelete("SET NULL");
    t.enum("overlap_choice", ["cancel", "replace", "keep"]).nullable();
    t.datetime("first_start_utc").nullable();
    t.datetime("last_start_utc").nullable();
    t.integer("rows_written").unsigned().notNullable().defaultTo(0);
    t.json("report").nullable();
    t.string("created_by", 40).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime("finished_at", { precision: 3 }).nullable();
    // the same bytes imported twice into one site is a no-op
    t.unique(["site_id", "sha256"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("imports");
}
