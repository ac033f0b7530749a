import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { savePreferencesAction } from "@/features/notices/server/actions";
import { lastCompleteWeek, queueWeeklyDigests } from "@/features/notices/server/digest";
import { queueImportNotices } from "@/features/notices/server/import-notices";
import { getNoticePreferences } from "@/features/notices/server/preferences";
import { clientFor, createSiteFor, createUserWithGroup } from "@/tests/support/db";
import { formData } from "@/tests/support/next";
import { caughtFor, deliverFor, linkIn } from "@/tests/support/mail";

async function finishedImport(opts: { groupId: number; siteId: number; userId: string; status: "done" | "failed"; message?: string }) {
  const [id] = await db("jobs").insert({
    kind: "import",
    group_id: opts.groupId,
    site_id: opts.siteId,
    payload: JSON.stringify({}),
    status: opts.status,
    phase: opts.status,
    message: opts.message ?? null,
    result: opts.status === "done" ? JSON.stringify({ rowsWritten: 17520 }) : null,
    created_by: opts.userId,
    finished_at: new Date(),
  });
  return id!;
}

describe("import notices", () => {
  test("finished and failed imports are announced once to the person who started them", async () => {
    const { user, group } = await createUserWithGroup({ role: "analyst" });
    const site = await createSiteFor(group.id);
    const done = await finishedImport({ groupId: group.id, siteId: site.id, userId: user.id, status: "done" });
    await finishedImport({ groupId: group.id, siteId: site.id, userId: user.id, status: "failed", message: "Row 12: the timestamp is not readable." });
    await queueImportNotices();
    await queueImportNotices(); // a second round (or a second worker) adds nothing
    const mails = await deliverFor(user.email);
    expect(mails.map((m) => m.subject).sort()).toEqual([`Import failed: ${site.name}`, `Import finished: ${site.name}`]);
    const finished = mails.find((m) => m.subject.startsWith("Import finished"))!;
    expect(linkIn(finished.text, `/sites/${site.id}/imports`).pathname).toBe(`/sites/${site.id}/imports`);
    expect(finished.text).toContain("rows written: 17520");
    expect(mails.find((m) => m.subject.startsWith("Import failed"))?.text).toContain("Row 12: the timestamp is not readable.");
    expect(await db("mail_outbox").where({ dedupe_key: `job-notice:${done}` }).count({ n: "*" }).first()).toEqual({ n: 1 });
  });

  test("no notice for a person who turned them off", async () => {
    const { user, group } = await createUserWithGroup({ role: "analyst" });
    const site = await createSiteFor(group.id);
    const client = await clientFor(user);
    expect(await client.call(() => savePreferencesAction({ ok: true }, formData({ weeklyDigest: "on" })))).toMatchObject({ ok: true });
    expect(await getNoticePreferences(user.id)).toEqual({ importNotices: false, weeklyDigest: true });
    await finishedImport({ groupId: group.id, siteId: site.id, userId: user.id, status: "done" });
    await queueImportNotices();
    expect(await deliverFor(user.email)).toHaveLength(0);
  });
});

describe("weekly digest", () => {
  test("the last complete week runs Monday to Monday (UTC)", () => {
    // 2026-12-09 is a Wednesday (common practice: ISO 8601 weeks start on Monday).
    const { start, end } = lastCompleteWeek(new Date("2026-12-09T10:00:00Z"));
    expect(start.toISOString()).toBe("2026-11-30T00:00:00.000Z");
    expect(end.toISOString()).toBe("2026-12-07T00:00:00.000Z");
  });

  test("an opted-in member gets label counts per site once a week; others get nothing", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const { user: quiet } = await createUserWithGroup({ role: "viewer" });
    await db("memberships").insert({ user_id: quiet.id, group_id: group.id, role: "viewer" });
    const site = await createSiteFor(group.id);
    await (await clientFor(user)).call(() => savePreferencesAction({ ok: true }, formData({ importNotices: "on", weeklyDigest: "on" })));

    // Monday 2026-12-14: the week 2026-12-07 .. 2026-12-13 is complete.
    const now = new Date("2026-12-14T06:00:00Z");
    const labels = ["stagnant", "stagnant", "local", "advective", "stagnant", "unclassified", "local"] as const;
    await db("evenings").insert(
      labels.map((label, i) => ({
        site_id: site.id,
        local_date: `2026-12-${String(7 + i).padStart(2, "0")}`,
        auto_label: label,
        final_label: i === 6 ? "advective" : label,
        label_source: i === 6 ? "override" : "auto",
        reasons: "[]",
        margins: "{}",
        metrics: "{}",
      })),
    );
    // Two anomalies on the 2026-12-08 evening (invented values).
    const tuesday = await db("evenings").where({ site_id: site.id, local_date: "2026-12-08" }).first<{ id: number }>("id");
    await db("anomalies").insert(
      ["O3", "CO2"].map((series) => ({
        site_id: site.id,
        evening_id: tuesday.id,
        series,
        kind: "rise-after-sunset",
        start_utc: new Date("2026-12-08T17:00:00Z"),
        end_utc: new Date("2026-12-08T19:00:00Z"),
        peak_score: 4.2,
        periods: 4,
      })),
    );
    // Outside the week: not counted.
    await db("evenings").insert({ site_id: site.id, local_date: "2026-12-14", auto_label: "local", final_label: "local", reasons: "[]", margins: "{}", metrics: "{}" });

    await queueWeeklyDigests(now);
    await queueWeeklyDigests(now);
    const mails = await deliverFor(user.email);
    expect(mails).toHaveLength(1);
    expect(mails[0]?.subject).toBe("Gloaming weekly digest, week of 2026-12-07");
    const text = mails[0]!.text;
    expect(text).toContain(`${site.name}: 7 evenings labelled`);
    expect(text).toContain("locally driven 1, stagnant 3, advective 2, unclassified 1");
    expect(text).toContain("overridden by an analyst: 1");
    expect(text).toContain("anomalies: 2");
    expect(text).toMatch(/screening aids/);
    expect(linkIn(text, "/settings").pathname).toBe("/settings");
    expect(await caughtFor(quiet.email)).toHaveLength(0);
    expect(await deliverFor(quiet.email)).toHaveLength(0);

    // Late in the week nothing new is queued for a person who opts in now.
    expect(await queueWeeklyDigests(new Date("2026-12-18T06:00:00Z"))).toBe(0);
  });
});
