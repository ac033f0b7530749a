import type { Knex } from "knex";

// Mail waits here until the worker hands it to SMTP; rows are written in the transaction of the event.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("mail_outbox", (t) => {
    t.charset("utf8mb4");
    t.collate("utf8mb4_unicode_ci");
    t.bigIncrements("id").unsigned().primary();
    // Set by producers that may run twice for one event (e.g. "digest:<user>:<week>"); NULLs do not collide.
    t.string("dedupe_key", 160).nullable().unique();
    t.string("kind", 40).notNullable();
    t.string("to_address", 255).notNullable();
    t.string("subject", 255).notNullable();
    t.text("text_body", "mediumtext").notNullable();
    t.text("html_body", "mediumtext").nullable();
    t.enum("status", ["pending", "sending", "sent", "failed"]).notNullable().defaultTo("pending");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.datetime("next_attempt_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.string("lease_owner", 64).nullable();
    t.datetime("lease_until", { precision: 3 }).nullable();
    t.text("last_error").nullable();
    // The Message-ID header we set, and the id the SMTP server answered with.
    t.string("message_id", 255).nullable();
    t.string("delivered_id", 255).nullable();
    t.datetime("sent_at", { precision: 3 }).nullable();
    t.datetime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["status", "next_attempt_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("mail_outbox");
}
