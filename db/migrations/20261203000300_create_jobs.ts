import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("jobs", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    t.string("kind", 40).notNullable();
    t.integer("group_id")
      .unsigned()
      .notNullable()
      .references("id")
      .inTable("research_groups")
      .onDelete("CASCADE");
    t.integer("site_id")
      .unsigned()
      .nullable()
      .references("id")
      .inTable("sites")
      .onDelete("CASCADE");
    t.json("payload").notNullable();
    t.enum("status", ["queued", "running", "done", "failed", "cancelled"])
      .notNullable()
      .defaultTo("queued");
    t.string("phase", 40).notNullable().defaultTo("queued");
    t.bigInteger("progress_done").unsigned().notNullable().defaultTo(0);
    t.bigInteger("progress_total").unsigned().notNullable().defaultTo(0);
    t.string("progress_unit", 16).notNullable().defaultTo("rows");
    t.text("message").nullable();
    t.json("result").nullable();
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.string("locked_by", 64).nullable();
    t.datetime("heartbeat_at", { precision: 3 }).nullable();
    t.string("created_by", 40).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime("started_at", { precision: 3 }).nullable();
    t.datetime("finished_at", { precision: 3 }).nullable();
    // the claim query scans queued jobs of given kinds in id order
    t.index(["status", "kind", "id"]);
    t.index(["group_id", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("jobs");
}
