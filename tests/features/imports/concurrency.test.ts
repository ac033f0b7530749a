/*
 * The same file imported twice at once lands once: two uploads of the same bytes at the same
 * moment through the real route, and two workers running the same import at the same moment.
 * Data is SYNTHETIC.
 */
import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { enqueueJob, getJob } from "@/lib/jobs/queue";
import { runOnce } from "@/lib/jobs/worker";
import { importJobHandlers } from "@/features/imports/server/jobs";
import { IMPORT_JOB } from "@/features/imports/server/mutations";
import { getImport } from "@/features/imports/server/queries";
import {
  analystWithSite,
  drain,
  halfHourCount,
  syntheticCsv,
  upload,
} from "@/tests/features/imports/helpers";

describe("two uploads of the same bytes at once", () => {
  test(
    "one import is queued, the other is answered as already on its way; one set of rows",
    { timeout: 120_000 },
    async () => {
      const { client, site } = await analystWithSite();
      const content = syntheticCsv(20, { startDate: "2023-04-01", seed: 31 });
      const answers = await Promise.all([
        upload(client, site.id, content, { name: "a.csv" }),
        upload(client, site.id, content, { name: "b.csv" }),
      ]);
      const statuses = answers.map((a) => a.res.status).sort();
      expect(statuses).toEqual([200, 202]);
      const queued = answers.find((a) => a.res.status === 202);
      const other = answers.find((a) => a.res.status === 200);
      expect(other?.body.status).toBe("already_imported");
      expect(other?.body.message).toMatch(
        /^Already (being )?imported: this file \(SHA-256 [0-9a-f]{12}…\).*Nothing was changed\.$/,
      );
      expect(other?.body.importId).toBe(queued?.body.importId);
      expect(await db("imports").where({ site_id: site.id }).count({ n: "*" }).first()).toEqual({ n: 1 });
      expect(
        await db("jobs").where({ site_id: site.id, kind: IMPORT_JOB }).count({ n: "*" }).first(),
      ).toEqual({ n: 1 });

      const job = await drain(queued?.body.jobId as number);
      expect(job.status).toBe("done");
      expect(await halfHourCount(site.id)).toBe(20 * 48);
      // Once landed, the same bytes again are "already imported".
      const later = await upload(client, site.id, content, { name: "c.csv" });
      expect(later.res.status).toBe(200);
      expect(later.body.message).toMatch(/^Already imported/);
    },
  );

  test(
    "many at once: still exactly one import row, one job and one set of rows",
    { timeout: 120_000 },
    async () => {
      const { client, site } = await analystWithSite();
      const content = syntheticCsv(3, { startDate: "2023-05-01", seed: 32 });
      const answers = await Promise.all(
        Array.from({ length: 6 }, (_, i) => upload(client, site.id, content, { name: `copy-${i}.csv` })),
      );
      expect(answers.filter((a) => a.res.status === 202)).toHaveLength(1);
      expect(
        answers.filter((a) => a.res.status === 200 && a.body.status === "already_imported"),
      ).toHaveLength(5);
      const queued = answers.find((a) => a.res.status === 202);
      await drain(queued?.body.jobId as number);
      expect(await db("imports").where({ site_id: site.id }).count({ n: "*" }).first()).toEqual({ n: 1 });
      expect(await halfHourCount(site.id)).toBe(3 * 48);
    },
  );
});

describe("two workers on the same import at once", () => {
  test(
    "one writes the rows, the other waits for it and finds them landed",
    { timeout: 180_000 },
    async () => {
      const { client, site, groupId } = await analystWithSite();
      const rows = 200 * 48;
      const { res, body } = await upload(
        client,
        site.id,
        syntheticCsv(200, { startDate: "2019-01-01", seed: 33 }),
      );
      expect(res.status).toBe(202);
      const importId = Number(body.importId);
      // A second job for the same import, as when a job is re-queued while its first worker still
      // writes (a heartbeat missed under load).
      const second = await enqueueJob({ kind: IMPORT_JOB, groupId, siteId: site.id, payload: { importId } });
      const first = body.jobId as number;
      // Two workers, each taking one job: run them side by side until both jobs have ended.
      const ids = new Set([first, second]);
      const ended = async (id: number) => {
        const j = await getJob(id);
        return j !== null && j.status !== "queued" && j.status !== "running";
      };
      const worker = async () => {
        const deadline = Date.now() + 150_000;
        while (Date.now() < deadline) {
          if ((await ended(first)) && (await ended(second))) return;
          if (!(await runOnce({ handlers: importJobHandlers, heartbeatMs: 1000, jobIds: [...ids] })))
            await new Promise((r) => setTimeout(r, 20));
        }
      };
      await Promise.all([worker(), worker()]);
      const jobs = await Promise.all([...ids].map((id) => getJob(id)));
      expect(jobs.map((j) => j?.status)).toEqual(["done", "done"]);
      const outcomes = jobs.map((j) => (j?.result as { outcome: string }).outcome).sort();
      expect(outcomes).toEqual(["already", "landed"]);
      expect(await halfHourCount(site.id)).toBe(rows);
      const owners = await db("half_hours").where({ site_id: site.id }).distinct("import_id");
      expect(owners).toEqual([{ import_id: importId }]);
      const imp = await getImport(site.id, importId);
      expect(imp?.status).toBe("landed");
      expect(imp?.rowsWritten).toBe(rows);
    },
  );
});
