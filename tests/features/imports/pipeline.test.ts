/*
 * The import pipeline against the real database: a two-year SYNTHETIC file lands and is
 * classified, the same bytes again change nothing, overlaps need a choice (default cancel),
 * deleting removes rows but keeps the original, and a cut connection leaves no partial rows.
 */
import { describe, expect, test } from "vitest";
import { GET as jobGET } from "@/app/api/jobs/[jobId]/route";
import { GET as rejectedGET } from "@/app/api/sites/[siteId]/imports/[importId]/rejected/route";
import { db } from "@/lib/db/knex";
import { getJob } from "@/lib/jobs/queue";
import { deleteImportAction, recomputeAction, resolveOverlapAction } from "@/features/imports/server/actions";
import type { JobView } from "@/features/imports/schemas";
import { getImport } from "@/features/imports/server/queries";
import { formData } from "@/tests/support/next";
import {
  BASE,
  analystWithSite,
  drain,
  eveningCount,
  halfHourCount,
  importFile,
  syntheticCsv,
  upload,
} from "@/tests/features/imports/helpers";

const TWO_YEARS = syntheticCsv(730, { startDate: "2021-01-01", seed: 11 });

describe("a two-year file", () => {
  test(
    "imports through the API, classifies its evenings, and the same file again is a no-op",
    { timeout: 180_000 },
    async () => {
      const { client, site } = await analystWithSite();
      const { job, imp, body } = await importFile(client, site.id, TWO_YEARS, { name: "two-years.csv" });
      expect(job.status).toBe("done");
      expect(imp.status).toBe("landed");
      expect(imp.rowsWritten).toBe(730 * 48);
      expect(await halfHourCount(site.id)).toBe(730 * 48);
      const labels = await db<{ site_id: number; auto_label: string }>("evenings")
        .where({ site_id: site.id })
        .select("auto_label")
        .count({ n: "*" })
        .groupBy("auto_label");
      const byLabel = Object.fromEntries(labels.map((l) => [l.auto_label, Number(l.n)]));
      // Every evening of the file is stored; the synthetic mix holds all three kinds.
      expect(Object.values(byLabel).reduce((a, b) => a + b, 0)).toBeGreaterThanOrEqual(729);
      expect(byLabel.local).toBeGreaterThan(0);
      expect(byLabel.stagnant).toBeGreaterThan(0);
      expect(byLabel.advective).toBeGreaterThan(0);
      expect(imp.report?.evenings?.computed).toBeGreaterThan(700);

      // GET /api/jobs/:id answers with phase, progress and the import's report.
      const res = await client.call(() =>
        jobGET(new Request(`${BASE}/api/jobs/${body.jobId}`), {
          params: Promise.resolve({ jobId: String(body.jobId) }),
        }),
      );
      const view = ((await res.json()) as { job: JobView }).job;
      expect(view).toMatchObject({
        status: "done",
        kind: "import",
        import: { id: imp.id, status: "landed" },
      });

      const before = await db("half_hours").where({ site_id: site.id }).count({ n: "*" }).first();
      const again = await upload(client, site.id, TWO_YEARS, { name: "renamed.csv" });
      expect(again.res.status).toBe(200);
      expect(again.body.status).toBe("already_imported");
      expect(again.body.message).toMatch(/^Already imported/);
      expect(await db("half_hours").where({ site_id: site.id }).count({ n: "*" }).first()).toEqual(before);
      expect(await db("imports").where({ site_id: site.id }).count({ n: "*" }).first()).toEqual({ n: 1 });
    },
  );
});

describe("overlaps", () => {
  const first = syntheticCsv(4, { startDate: "2022-03-01", seed: 3 });
  const overlapping = syntheticCsv(4, { startDate: "2022-03-03", seed: 4 });

  test("the API default is cancel: nothing written, a clear message", async () => {
    const { client, site } = await analystWithSite();
    await importFile(client, site.id, first);
    const rows = await db("half_hours").where({ site_id: site.id }).orderBy("start_utc");
    const { job, imp } = await importFile(client, site.id, overlapping);
    expect(job.status).toBe("done");
    expect(imp.status).toBe("refused");
    expect(imp.report?.refusal?.message).toMatch(/overlaps 96 half-hours .* cancelled, nothing was written/);
    expect(await db("half_hours").where({ site_id: site.id }).orderBy("start_utc")).toEqual(rows);
  });

  test("the page asks; replace overwrites the overlap, keep only adds new periods", async () => {
    const { client, site } = await analystWithSite();
    const a = await importFile(client, site.id, first);
    const asked = await importFile(client, site.id, overlapping, { settings: { overlap: "ask" } });
    expect(asked.imp.status).toBe("pending");
    expect(asked.imp.report?.overlap?.existingRows).toBe(96);
    expect(await halfHourCount(site.id)).toBe(192);

    const answer = await client.call(() => resolveOverlapAction(site.id, asked.imp.id, "replace"));
    expect(answer.ok).toBe(true);
    const job = await drain(answer.jobId as number);
    expect(job.status).toBe("done");
    expect(await halfHourCount(site.id)).toBe(288);
    const owners = await db<{ site_id: number; import_id: number }>("half_hours")
      .where({ site_id: site.id })
      .select("import_id")
      .count({ n: "*" })
      .groupBy("import_id");
    expect(Object.fromEntries(owners.map((o) => [o.import_id, Number(o.n)]))).toEqual({
      [a.imp.id]: 96,
      [asked.imp.id]: 192,
    });

    // keep: a third file over the same days only fills what is not stored.
    const third = syntheticCsv(6, { startDate: "2022-03-04", seed: 5 });
    const kept = await importFile(client, site.id, third, { settings: { overlap: "keep" } });
    expect(kept.imp.status).toBe("landed");
    expect(kept.imp.rowsWritten).toBe(48 * 3);
    expect(await halfHourCount(site.id)).toBe(288 + 48 * 3);
  });

  test("cancel on the page's question writes nothing", async () => {
    const { client, site } = await analystWithSite();
    await importFile(client, site.id, first);
    const asked = await importFile(client, site.id, overlapping, { settings: { overlap: "ask" } });
    const answer = await client.call(() => resolveOverlapAction(site.id, asked.imp.id, "cancel"));
    expect(answer).toEqual({ ok: true, jobId: null });
    expect((await getImport(site.id, asked.imp.id))?.status).toBe("refused");
    expect(await halfHourCount(site.id)).toBe(96 * 2);
  });
});

describe("deleting and purging", () => {
  test("delete removes the rows and keeps the original; a lead's purge removes the original", async () => {
    const { client, site, groupId } = await analystWithSite("lead");
    const content = syntheticCsv(3, { startDate: "2022-09-01" });
    const { imp } = await importFile(client, site.id, content);
    const key =
      (await db<{ id: number; storage_key: string }>("imports").where({ id: imp.id }).first("storage_key"))
        ?.storage_key ?? "";
    const del = await client.call(() => deleteImportAction(site.id, imp.id, false));
    expect(del.ok).toBe(true);
    expect(await halfHourCount(site.id)).toBe(0);
    expect((await getImport(site.id, imp.id))?.status).toBe("deleted");
    const { getObject } = await import("@/lib/storage/storage");
    await expect(getObject(key)).resolves.toBeDefined();
    if (del.jobId) await drain(del.jobId);

    // The same bytes may be imported again after a delete.
    const again = await importFile(client, site.id, content);
    expect(again.imp.status).toBe("landed");
    expect(await halfHourCount(site.id)).toBe(144);

    const purge = await client.call(() => deleteImportAction(site.id, imp.id, true));
    expect(purge.ok).toBe(true);
    expect((await getImport(site.id, imp.id))?.status).toBe("purged");
    expect(groupId).toBeGreaterThan(0);
  });

  test("an analyst may not purge", async () => {
    const { client, site } = await analystWithSite("analyst");
    const { imp } = await importFile(client, site.id, syntheticCsv(2, { startDate: "2022-10-01" }));
    const r = await client.call(() => deleteImportAction(site.id, imp.id, true));
    expect(r).toMatchObject({ ok: false, message: "Your role in this group does not allow this." });
    expect((await getImport(site.id, imp.id))?.status).toBe("landed");
  });
});

describe("rejected rows", () => {
  test("the full list downloads as CSV with line numbers", async () => {
    const { client, site } = await analystWithSite();
    const lines = syntheticCsv(2).trimEnd().split("\n");
    const header = (lines[0] as string).split(",");
    const ws = header.indexOf("WS");
    for (let i = 1; i <= 70; i++) {
      const c = (lines[i] as string).split(",");
      c[ws] = "x";
      lines[i] = c.join(",");
    }
    const { imp } = await importFile(client, site.id, `${lines.join("\n")}\n`);
    expect(imp.report?.rejectedTotal).toBe(70);
    expect(imp.report?.rejectedSample.length).toBe(50);
    const res = await client.call(() =>
      rejectedGET(new Request(`${BASE}/api/sites/${site.id}/imports/${imp.id}/rejected`), {
        params: Promise.resolve({ siteId: String(site.id), importId: String(imp.id) }),
      }),
    );
    expect(res.headers.get("content-type")).toMatch(/text\/csv/);
    const text = await res.text();
    const rows = text.trimEnd().split("\n");
    expect(rows[0]).toBe("line,column,value,reason");
    expect(rows.length).toBe(71);
    expect(rows[1]).toMatch(/^2,WS,x,/);
  });
});

describe("recompute a period", () => {
  test("an analyst queues it and the job reports evenings", async () => {
    const { client, site } = await analystWithSite();
    await importFile(client, site.id, syntheticCsv(5, { startDate: "2022-05-01" }));
    await db("evenings").where({ site_id: site.id }).delete();
    const state = await client.call(() =>
      recomputeAction({ ok: false }, formData({ siteId: site.id, from: "2022-05-01", to: "2022-05-05" })),
    );
    expect(state.ok).toBe(true);
    const job = await drain(state.jobId as number);
    expect(job.status).toBe("done");
    expect(job.progressUnit).toBe("evenings");
    expect(await eveningCount(site.id)).toBeGreaterThanOrEqual(4);
  });

  test("a period that ends before it starts is answered beside the field", async () => {
    const { client, site } = await analystWithSite();
    const state = await client.call(() =>
      recomputeAction({ ok: false }, formData({ siteId: site.id, from: "2022-05-05", to: "2022-05-01" })),
    );
    expect(state.ok).toBe(false);
    expect(state.fieldErrors?.to).toEqual(["The period ends before it starts."]);
  });
});

describe("a database connection cut mid-import", () => {
  test("leaves no partial rows and a failed job with a clear reason", { timeout: 180_000 }, async () => {
    const { client, site } = await analystWithSite();
    const { res, body } = await upload(
      client,
      site.id,
      syntheticCsv(1200, {
        startDate: "2010-01-01",
        seed: 9,
        columns: ["WS", "WD", "USTAR", "W_SIGMA", "H", "TA", "PA"],
      }),
    );
    expect(res.status).toBe(202);
    const jobId = body.jobId as number;
    // Kill the connection that writes this site's rows once the writing phase has begun.
    let killed = false;
    const killer = (async () => {
      const deadline = Date.now() + 120_000;
      while (!killed && Date.now() < deadline) {
        const [rows] = (await db.raw(
          "SELECT ID AS id FROM information_schema.PROCESSLIST WHERE INFO LIKE 'LOAD DATA LOCAL INFILE%INTO TABLE half_hours%' AND INFO LIKE ?",
          [`%SET site_id = ${site.id},%`],
        )) as [Array<{ id: number }>];
        const id = rows[0]?.id;
        if (id !== undefined) {
          await db.raw(`KILL CONNECTION ${Number(id)}`);
          killed = true;
          break;
        }
        const j = await getJob(jobId);
        if (j && j.status !== "queued" && j.status !== "running") break;
        await new Promise((r) => setTimeout(r, 5));
      }
    })();
    const job = await drain(jobId);
    await killer;
    expect(killed).toBe(true);
    expect(job.status).toBe("failed");
    expect(job.message).toMatch(/database connection was lost.*rolled back, so none of its rows were stored/);
    expect(await halfHourCount(site.id)).toBe(0);
    const imp = await getImport(site.id, Number(body.importId));
    expect(imp?.status).toBe("failed");
    expect(await eveningCount(site.id)).toBe(0);
  });
});
