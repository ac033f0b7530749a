/*
 * Shared by the import tests: SYNTHETIC files (lib/synthetic, invented data), an upload through
 * the real route handler, and a worker run until a given job has ended. Test files run in
 * parallel against one database, so a drain may also run another file's queued jobs; each
 * test waits for its own job only.
 */
import { POST } from "@/app/api/sites/[siteId]/imports/route";
import type { Role } from "@/lib/auth/roles";
import type { SiteParams } from "@/lib/classify/site";
import { db } from "@/lib/db/knex";
import { getJob, type Job } from "@/lib/jobs/queue";
import { runOnce } from "@/lib/jobs/worker";
import { tableToCsv } from "@/lib/synthetic/csv";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { importJobHandlers } from "@/features/imports/server/jobs";
import type { ImportSettings, ImportSummary } from "@/features/imports/schemas";
import { getImport } from "@/features/imports/server/queries";
import { clientFor, createSiteFor, createUserWithGroup, type SiteRow } from "@/tests/support/db";
import type { FakeClient } from "@/tests/support/next";

export const BASE = "http://localhost:3000";

/** An invented temperate-forest site (not a real tower). */
export const SITE_PARAMS: SiteParams = {
  latitudeDeg: 45.5,
  longitudeDeg: 8.25,
  elevationM: 400,
  measurementHeightM: 30,
  canopyHeightM: 20,
  utcOffsetHours: 1,
};

/** A SYNTHETIC half-hourly CSV of `days` days (TIMESTAMP_START/END, -9999 missing). */
export function syntheticCsv(days: number, opts: { startDate?: string; seed?: number; columns?: string[] } = {}): string {
  const { table } = generateSynthetic({ site: SITE_PARAMS, startDate: opts.startDate ?? "2022-06-01", days, seed: opts.seed ?? 7 });
  return tableToCsv(table, { utcOffsetHours: SITE_PARAMS.utcOffsetHours, columns: opts.columns });
}

/** A person with `role` in a new group, a site of that group and a signed-in client. */
export async function analystWithSite(role: Role = "analyst"): Promise<{ client: FakeClient; site: SiteRow; userId: string; groupId: number }> {
  const { user, group } = await createUserWithGroup({ role });
  const site = await createSiteFor(group.id, { latitude: SITE_PARAMS.latitudeDeg, longitude: SITE_PARAMS.longitudeDeg, utc_offset_hours: 1 });
  return { client: await clientFor(user, { groupId: group.id }), site, userId: user.id, groupId: group.id };
}

/** A multipart upload request as a browser or script sends it. */
export function uploadRequest(siteId: number, content: string | Uint8Array, opts: { name?: string; settings?: ImportSettings; headers?: Record<string, string> } = {}): Request {
  const form = new FormData();
  if (opts.settings) form.append("mapping", JSON.stringify(opts.settings));
  form.append("file", new Blob([typeof content === "string" ? content : Buffer.from(content)], { type: "text/csv" }), opts.name ?? "tower.csv");
  return new Request(`${BASE}/api/sites/${siteId}/imports`, { method: "POST", body: form, headers: opts.headers });
}

export type UploadBody = { status?: string; importId?: number; jobId?: number | null; message?: string; error?: { code: string; message: string } };

/** POSTs a file through the route handler as `client`. */
export async function upload(client: FakeClient, siteId: number, content: string | Uint8Array, opts: Parameters<typeof uploadRequest>[2] = {}): Promise<{ res: Response; body: UploadBody }> {
  const res = await client.call(() => POST(uploadRequest(siteId, content, opts), { params: Promise.resolve({ siteId: String(siteId) }) }));
  return { res, body: (await res.json()) as UploadBody };
}

/** Runs job `jobId` (and no other file's job) until it has ended; returns it. */
export async function drain(jobId: number, timeoutMs = 120_000): Promise<Job> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(jobId);
    if (!job) throw new Error(`job ${jobId} is missing`);
    if (job.status !== "queued" && job.status !== "running") return job;
    if (Date.now() > deadline) throw new Error(`job ${jobId} did not end (status ${job.status}, phase ${job.phase})`);
    const ran = await runOnce({ handlers: importJobHandlers, heartbeatMs: 1000, jobIds: [jobId] });
    if (!ran) await new Promise((r) => setTimeout(r, 50));
  }
}

/** Uploads and runs the import to its end. */
export async function importFile(client: FakeClient, siteId: number, content: string | Uint8Array, opts: Parameters<typeof uploadRequest>[2] = {}): Promise<{ job: Job; imp: ImportSummary; body: UploadBody }> {
  const { res, body } = await upload(client, siteId, content, opts);
  if (res.status !== 202 || !body.jobId) throw new Error(`upload answered ${res.status}: ${JSON.stringify(body)}`);
  const job = await drain(body.jobId);
  const imp = await getImport(siteId, Number(body.importId));
  if (!imp) throw new Error("import row missing");
  return { job, imp, body };
}

export async function halfHourCount(siteId: number): Promise<number> {
  const r = (await db("half_hours").where({ site_id: siteId }).count({ n: "*" }).first()) as { n: number | string };
  return Number(r.n);
}

export async function eveningCount(siteId: number): Promise<number> {
  const r = (await db("evenings").where({ site_id: siteId }).count({ n: "*" }).first()) as { n: number | string };
  return Number(r.n);
}
