import { describe, expect, test } from "vitest";
import { createSiteAction, deleteSiteAction, updateSiteAction } from "@/features/sites/server/actions";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import { clientFor, createSiteFor, createUserWithGroup, uniqueTag, type SiteRow } from "@/tests/support/db";
import { FakeClient, formData } from "@/tests/support/next";

// Form values as a browser sends them: strings, empty for fields left blank.
function form(overrides: Record<string, string> = {}) {
  return {
    name: `Action site ${uniqueTag()}`,
    latitude: "-33.25",
    longitude: "150,5", // a decimal comma is accepted
    elevationM: "120",
    measurementHeightM: "40",
    canopyHeightM: "28",
    displacementHeightM: "",
    utcOffsetHours: "10",
    notes: "",
    ...overrides,
  };
}

async function member(role: Role) {
  const { user, group } = await createUserWithGroup({ role });
  return { user, group, client: await clientFor(user, { groupId: group.id }) };
}

const initial = { ok: true };

describe("createSiteAction", () => {
  test("anonymous: sent to sign in, nothing written", async () => {
    const { group } = await createUserWithGroup();
    const name = `Anon ${uniqueTag()}`;
    const outcome = await new FakeClient().run(() =>
      createSiteAction(initial, formData({ ...form({ name }), groupId: group.id })),
    );
    expect(outcome).toEqual({ kind: "redirect", location: "/sign-in" });
    expect(await db("sites").where({ name }).first()).toBeUndefined();
  });

  test.each(["viewer", "analyst"] as const)("%s: refused with a message, nothing written", async (role) => {
    const { group, client } = await member(role);
    const state = await client.call(() =>
      createSiteAction(initial, formData({ ...form(), groupId: group.id })),
    );
    expect(state).toMatchObject({ ok: false, message: "Only a lead of this group can change its sites." });
    expect(await db("sites").where({ group_id: group.id }).first()).toBeUndefined();
  });

  test("a lead naming another group: refused as not found", async () => {
    const { client } = await member("lead");
    const other = await createUserWithGroup();
    const state = await client.call(() =>
      createSiteAction(initial, formData({ ...form(), groupId: other.group.id })),
    );
    expect(state.ok).toBe(false);
    expect(state.message).toMatch(/does not exist or is not in one of your groups/);
    expect(await db("sites").where({ group_id: other.group.id }).first()).toBeUndefined();
  });

  test("lead: creates the site, audits it, goes to its page", async () => {
    const { user, group, client } = await member("lead");
    const values = form();
    const outcome = await client.run(() =>
      createSiteAction(initial, formData({ ...values, groupId: group.id })),
    );
    const row = (await db<SiteRow>("sites").where({ group_id: group.id, name: values.name }).first())!;
    expect(outcome).toEqual({ kind: "redirect", location: `/sites/${row.id}` });
    expect(row).toMatchObject({
      latitude: -33.25,
      longitude: 150.5,
      displacement_height_m: null,
      notes: null,
      utc_offset_hours: 10,
    });
    expect(
      await db("audit_log")
        .where({ action: "site.create", entity_id: String(row.id) })
        .first(),
    ).toMatchObject({
      user_id: user.id,
      group_id: group.id,
    });
  });

  test("invalid values come back per field, with what was typed", async () => {
    const { group, client } = await member("lead");
    const typed = form({ latitude: "north", measurementHeightM: "", utcOffsetHours: "14.5" });
    const state = await client.call(() =>
      createSiteAction(initial, formData({ ...typed, groupId: group.id })),
    );
    expect(state.ok).toBe(false);
    expect(state.fieldErrors).toEqual({
      latitude: ["The latitude must be a number."],
      measurementHeightM: ["Enter the measurement height."],
      utcOffsetHours: ["The UTC offset must be at most 14 h."],
    });
    expect(state.values?.latitude).toBe("north");
    expect(state.values?.name).toBe(typed.name);
  });
});

describe("updateSiteAction and deleteSiteAction", () => {
  test.each(["viewer", "analyst"] as const)("%s: refused, the site unchanged", async (role) => {
    const { group, client } = await member(role);
    const site = await createSiteFor(group.id);
    const upd = await client.call(() => updateSiteAction(site.id, initial, formData(form())));
    expect(upd).toMatchObject({ ok: false, message: "Only a lead of this group can change its sites." });
    const del = await client.call(() => deleteSiteAction(site.id));
    expect(del).toMatchObject({ ok: false, message: "Only a lead of this group can change its sites." });
    expect(await db("sites").where({ id: site.id }).first()).toMatchObject({ name: site.name });
  });

  test("another group's lead: refused as not found", async () => {
    const { client } = await member("lead");
    const other = await createUserWithGroup();
    const site = await createSiteFor(other.group.id);
    expect((await client.call(() => updateSiteAction(site.id, initial, formData(form())))).ok).toBe(false);
    expect((await client.call(() => deleteSiteAction(site.id))).ok).toBe(false);
    expect(await db("sites").where({ id: site.id }).first()).toMatchObject({ name: site.name });
  });

  test("anonymous: sent to sign in", async () => {
    const { group } = await createUserWithGroup();
    const site = await createSiteFor(group.id);
    expect(await new FakeClient().run(() => updateSiteAction(site.id, initial, formData(form())))).toEqual({
      kind: "redirect",
      location: "/sign-in",
    });
    expect(await new FakeClient().run(() => deleteSiteAction(site.id))).toEqual({
      kind: "redirect",
      location: "/sign-in",
    });
  });

  test("lead: update saves, audits, goes to the site; delete removes and audits", async () => {
    const { user, group, client } = await member("lead");
    const site = await createSiteFor(group.id);
    const values = form({ name: site.name, displacementHeightM: "18.7", notes: "moved the sonic" });
    const outcome = await client.run(() => updateSiteAction(site.id, initial, formData(values)));
    expect(outcome).toEqual({ kind: "redirect", location: `/sites/${site.id}` });
    expect(await db("sites").where({ id: site.id }).first()).toMatchObject({
      displacement_height_m: 18.7,
      notes: "moved the sonic",
    });
    expect(
      await db("audit_log")
        .where({ action: "site.update", entity_id: String(site.id) })
        .first(),
    ).toMatchObject({
      user_id: user.id,
    });

    expect(await client.call(() => deleteSiteAction(site.id))).toMatchObject({ ok: true });
    expect(await db("sites").where({ id: site.id }).first()).toBeUndefined();
    expect(
      await db("audit_log")
        .where({ action: "site.delete", entity_id: String(site.id) })
        .first(),
    ).toMatchObject({
      user_id: user.id,
      group_id: group.id,
    });
  });

  test("a displacement height above the measurement height is reported beside that field", async () => {
    const { group, client } = await member("lead");
    const site = await createSiteFor(group.id);
    const state = await client.call(() =>
      updateSiteAction(site.id, initial, formData(form({ displacementHeightM: "45" }))),
    );
    expect(state.fieldErrors).toEqual({
      displacementHeightM: ["The displacement height must be below the measurement height."],
    });
  });
});
