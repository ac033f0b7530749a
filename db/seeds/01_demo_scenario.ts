/*
 * Seeds the invented demo scenario (group, site, three accounts). Idempotent: existing rows
 * are kept as they are, missing ones are added.
 */
import type { Knex } from "knex";
import { generateIdFromEntropySize } from "lucia";
import { hashPassword } from "../../lib/auth/password";
import { DEMO_ACCOUNTS, DEMO_GROUP_NAME, DEMO_PASSWORD, DEMO_SITE } from "../../lib/demo/scenario";

/** Creates whatever part of the demo scenario is missing; returns the demo group's id. */
export async function seedDemoScenario(knex: Knex): Promise<number> {
  return knex.transaction(async (trx) => {
    const existing = await trx("research_groups").where({ name: DEMO_GROUP_NAME }).first("id");
    const groupId = existing?.id ?? (await trx("research_groups").insert({ name: DEMO_GROUP_NAME }))[0];
    if (groupId === undefined) throw new Error("could not create the demo group");

    const passwordHash = await hashPassword(DEMO_PASSWORD);
    for (const account of DEMO_ACCOUNTS) {
      let user = await trx("users").where({ email: account.email }).first("id");
      if (!user) {
        user = { id: generateIdFromEntropySize(10) };
        await trx("users").insert({
          id: user.id,
          email: account.email,
          display_name: account.displayName,
          password_hash: passwordHash,
        });
      }
      await trx("memberships")
        .insert({ user_id: user.id, group_id: groupId, role: account.role })
        .onConflict(["user_id", "group_id"])
        .ignore();
    }

    await trx("sites")
      .insert({ group_id: groupId, ...DEMO_SITE })
      .onConflict(["group_id", "name"])
      .ignore();
    return groupId;
  });
}

export async function seed(knex: Knex): Promise<void> {
  await seedDemoScenario(knex);
}
