import { createHash } from "node:crypto";
import Papa from "papaparse";
import { beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { createApiToken } from "@/lib/auth/tokens";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import { GET } from "@/app/api/sites/[siteId]/export/route";
import { FakeClient } from "@/tests/support/next";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup, uniqueTag } from "@/tests/support/db";
import { insertEvenings } from "@/tests/features/seasons/evening-rows";
import { unzipBuffer } from "@/tests/features/exports/unzip";

const NASTY_NOTES = ["=HYPERLINK(\"http://example.test\")", "+SUM(A1:A2)", "-2+3", "@cmd", "\tindent", "\rreturn", "=1\nsecond line"];

describe("export zip", () => {
  let owner: Awaited<ReturnType<typeof createUserWithGroup>>;
  let viewer: Awaited<ReturnType<typeof createUser>>;
  let siteId: number;
  const sha = createHash("sha256").update("demo file").digest("hex");

  beforeAll(async () => {
    owner = await createUserWithGroup({ role: "lead" });
    viewer = await createUser({ displayName: "Viewer Person" });
    await addMember(viewer.id, owner.group.id, "viewer");
    const site = await createSiteFor(owner.group.id, { name: `=Tower ${uniqueTag()}`, utc_offset_hours: -3.5, latitude: 47.5 });
    siteId = site.id;
    const [ruleSetId] = await db("rule_sets").insert({
      group_id: owner.group.id,
      version: 1,
      name: "Test rules",
      definition: JSON.stringify(DEFAULT_RULE_SET),
      author_id: owner.user.id,
      comment: "for the export test",
    });
    await db.raw("UPDATE sites SET active_rule_set_id = ? WHERE id = ?", [Number(ruleSetId), siteId]);
    const dates = ["2021-03-01", "2021-03-02", "2021-03-03", "2021-03-04", "2021-03-05", "2021-03-06", "2021-03-07", "2021-03-08"];
    await insertEvenings(
      siteId,
      dates.map((date, i) => ({
        date,
        auto: i % 2 ? "stagnant" : "local",
        final: i < NASTY_NOTES.length && i % 3 === 0 ? "advective" : undefined,
        note: i < NASTY_NOTES.length && i % 3 === 0 ? NASTY_NOTES[i] : undefined,
        ruleSetId: Number(ruleSetId),
        ruleSetVersion: 1,
      })),
    );
    // notes on automatic evenings too, to try every dangerous first character
    for (let i = 0; i < NASTY_NOTES.length; i++) {
      await db("evenings").where({ site_id: siteId, local_date: dates[i] }).update({ override_note: NASTY_NOTES[i] });
    }
    const [importId] = await db("imports").insert({
      site_id: siteId,
      sha256: sha,
      original_name: "tower-2021.csv",
      size_bytes: 1234,
      storage_key: `objects/${sha}`,
      status: "landed",
    });
    // two days of half-hours from local midnight of 2021-03-01 (UTC-03:30 = 03:30Z)
    const start = Date.parse("2021-03-01T03:30:00Z");
    const rows = Array.from({ length: 96 }, (_, i) => ({
      site_id: siteId,
      start_utc: new Date(start + i * 1_800_000),
      import_id: importId,
      ws: 2 + (i % 5) * 0.5,
      h: i % 2 ? -35.25 : 120,
      ta: i % 3 ? -4.5 : 1.25,
    }));
    await db("half_hours").insert(rows);
  });

  const request = (q: string) => new Request(`http://localhost/api/sites/${siteId}/export?${q}`);
  const download = async (client: FakeClient, q: string) => {
    const res = await client.call(() => GET(request(q), { params: Promise.resolve({ siteId: String(siteId) }) }));
    return res;
  };

  test("a viewer downloads a zip that round-trips and carries its provenance", async () => {
    const client = await clientFor(viewer);
    const res = await download(client, "from=2021-03-01&to=2021-03-08&halfHours=1");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/zip");
    expect(res.headers.get("content-disposition")).toMatch(/attachment; filename="gloaming-tower-[0-9a-f]+-2021-03-01_2021-03-08\.zip"/);
    const files = await unzipBuffer(Buffer.from(await res.arrayBuffer()));
    const names = [...files.keys()].map((n) => n.split("/").pop());
    expect(names).toEqual(["evenings.csv", "half-hours.csv", "provenance.json"]);
    const get = (suffix: string) => {
      const entry = [...files.entries()].find(([n]) => n.endsWith(suffix));
      if (!entry) throw new Error(`no ${suffix}`);
      return entry[1];
    };

    const evenings = Papa.parse<Record<string, string>>(get("evenings.csv").toString("utf8"), { header: true, skipEmptyLines: true });
    expect(evenings.errors).toEqual([]);
    const stored: Array<{ d: string; final_label: string; label_source: string; override_note: string | null }> = await db("evenings")
      .where({ site_id: siteId })
      .orderBy("local_date")
      .select(db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS d"), "final_label", "label_source", "override_note");
    expect(evenings.data).toHaveLength(stored.length);
    evenings.data.forEach((row, i) => {
      const s = stored[i];
      expect(row.date).toBe(s?.d);
      expect(row.label).toBe(s?.final_label);
      expect(row.source).toBe(s?.label_source === "override" ? "override" : "automatic");
      // formula-looking text comes back with a leading quote, otherwise unchanged
      const note = s?.override_note ?? "";
      expect(row.note).toBe(/^[=+\-@\t\r]/.test(note) ? `'${note}` : note);
      expect(row.rule_set_version).toBe("1");
      // times in ISO 8601 with the data clock's offset
      expect(row.sunset).toMatch(/^\d{4}-\d{2}-\d{2}T15:00:00-03:30$/);
      // negative numbers stay numbers (not neutralised)
      expect(row.wd_shift_deg).toBe("-12.5");
      expect(row.site?.startsWith("'=Tower")).toBe(true);
    });

    const hh = Papa.parse<Record<string, string>>(get("half-hours.csv").toString("utf8"), { header: true, skipEmptyLines: true });
    expect(hh.errors).toEqual([]);
    expect(hh.data).toHaveLength(96);
    expect(hh.data[0]?.timestamp_start).toBe("2021-03-01T00:00:00-03:30");
    expect(hh.data[1]?.H_W_m2).toBe("-35.25");
    expect(hh.data[0]?.TA_degC).toBe("1.25");
    expect(hh.data[1]?.TA_degC).toBe("-4.5");
    expect(hh.data[0]?.LE_W_m2).toBe("");
    // morning half-hours belong to the evening before (outside the period here); afternoon ones to their day
    expect(hh.data[0]?.evening_label).toBe("");
    const afternoon = hh.data.find((r) => r.timestamp_start === "2021-03-01T16:00:00-03:30");
    expect(afternoon?.evening_date).toBe("2021-03-01");
    expect(afternoon?.evening_label).toBe(stored[0]?.final_label);

    const prov = JSON.parse(get("provenance.json").toString("utf8")) as {
      software: { version: string };
      exportedBy: { id: string; displayName: string };
      exportedAt: string;
      site: { id: number; utcOffset: string };
      ruleSets: Array<{ version: number; definition: { thresholds: Record<string, unknown> }; eveningsLabelled: number }>;
      sourceFiles: Array<{ sha256: string; name: string }>;
      files: Array<{ name: string; rows: number; sha256: string }>;
      caution: string;
    };
    const pkg = (await import("@/package.json")).default;
    expect(prov.software.version).toBe(pkg.version);
    expect(prov.exportedBy).toMatchObject({ id: viewer.id, displayName: "Viewer Person" });
    expect(prov.exportedAt).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\+00:00$/);
    expect(prov.site).toMatchObject({ id: siteId, utcOffset: "-03:30" });
    expect(prov.ruleSets).toHaveLength(1);
    expect(prov.ruleSets[0]?.eveningsLabelled).toBe(8);
    expect(Object.keys(prov.ruleSets[0]?.definition.thresholds ?? {})).toContain("stillUstar");
    expect(prov.sourceFiles).toEqual([expect.objectContaining({ sha256: sha, name: "tower-2021.csv" })]);
    const evFile = prov.files.find((f) => f.name === "evenings.csv");
    expect(evFile?.rows).toBe(8);
    expect(evFile?.sha256).toBe(createHash("sha256").update(get("evenings.csv")).digest("hex"));
    expect(prov.files.find((f) => f.name === "half-hours.csv")?.rows).toBe(96);
    expect(prov.caution).toMatch(/screening aids/);
  });

  test("without halfHours the zip holds the evenings and the provenance only", async () => {
    const client = await clientFor(viewer);
    const res = await download(client, "from=2021-03-02&to=2021-03-03");
    const files = await unzipBuffer(Buffer.from(await res.arrayBuffer()));
    expect([...files.keys()].map((n) => n.split("/").pop())).toEqual(["evenings.csv", "provenance.json"]);
    const csv = [...files.values()][0]?.toString("utf8") ?? "";
    expect(csv.trim().split("\r\n")).toHaveLength(3);
  });

  test("a script with an API token gets the same zip; a wrong token is refused", async () => {
    const { secret } = await createApiToken(viewer.id, "export script");
    const withToken = (token: string) =>
      new FakeClient().call(() =>
        GET(new Request(`http://localhost/api/sites/${siteId}/export?from=2021-03-01&to=2021-03-02`, { headers: { authorization: `Bearer ${token}` } }), {
          params: Promise.resolve({ siteId: String(siteId) }),
        }),
      );
    const ok = await withToken(secret);
    expect(ok.status).toBe(200);
    const files = await unzipBuffer(Buffer.from(await ok.arrayBuffer()));
    expect(files.size).toBe(2);
    expect((await withToken(`${secret}x`)).status).toBe(401);
  });

  test("roles and input: other group 404, anonymous 401, bad dates 422", async () => {
    const stranger = await clientFor((await createUserWithGroup({ role: "lead" })).user);
    expect((await download(stranger, "from=2021-03-01&to=2021-03-08")).status).toBe(404);
    expect((await download(new FakeClient(), "from=2021-03-01&to=2021-03-08")).status).toBe(401);
    const client = await clientFor(viewer);
    expect((await download(client, "from=2021-03-08&to=2021-03-01")).status).toBe(422);
    expect((await download(client, "from=2021-02-30&to=2021-03-01")).status).toBe(422);
    expect((await download(client, "to=2021-03-01")).status).toBe(422);
  });
});
