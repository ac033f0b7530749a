import { queryOptions } from "@tanstack/react-query";
import type { ImportSettings, JobView } from "@/features/imports/schemas";

/** Query keys of the import feature. */
export const importKeys = {
  all: ["imports"] as const,
  job: (jobId: number) => ["jobs", jobId] as const,
};

const ACTIVE = new Set(["queued", "running"]);

/** A job from GET /api/jobs/:id, polled twice a second while it is queued or running. */
export function jobOptions(jobId: number) {
  return queryOptions({
    queryKey: importKeys.job(jobId),
    queryFn: async (): Promise<JobView> => {
      const res = await fetch(`/api/jobs/${jobId}`, { headers: { accept: "application/json" }, cache: "no-store" });
      const body = (await res.json().catch(() => null)) as { job?: JobView; error?: { message?: string } } | null;
      if (!res.ok || !body?.job) throw new Error(body?.error?.message ?? `Request failed (${res.status})`);
      return body.job;
    },
    staleTime: 0,
    refetchInterval: (q) => (q.state.data && !ACTIVE.has(q.state.data.status) ? false : 500),
  });
}

export type UploadAnswer =
  | { kind: "queued"; importId: number; jobId: number }
  | { kind: "already"; importId: number; jobId: number | null; message: string }
  | { kind: "error"; status: number; message: string };

/**
 * Sends a file with XMLHttpRequest, whose upload events give bytes sent (fetch reports no
 * upload progress). Resolves with the server's answer; `onProgress(sent, total)` in bytes.
 */
export function uploadFile(
  siteId: number,
  file: File,
  settings: ImportSettings,
  onProgress: (sent: number, total: number) => void,
): { done: Promise<UploadAnswer>; abort: () => void } {
  const xhr = new XMLHttpRequest();
  const done = new Promise<UploadAnswer>((resolve) => {
    xhr.open("POST", `/api/sites/${siteId}/imports`);
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => onProgress(e.loaded, e.lengthComputable ? e.total : file.size);
    xhr.upload.onload = () => onProgress(file.size, file.size);
    xhr.onload = () => {
      const body = xhr.response as { status?: string; importId?: number; jobId?: number | null; message?: string; error?: { message?: string } } | null;
      if (xhr.status === 202 && body?.jobId) resolve({ kind: "queued", importId: Number(body.importId), jobId: body.jobId });
      else if (xhr.status === 200 && body?.status === "already_imported") {
        resolve({ kind: "already", importId: Number(body.importId), jobId: body.jobId ?? null, message: body.message ?? "Already imported." });
      } else resolve({ kind: "error", status: xhr.status, message: body?.error?.message ?? `The upload failed (${xhr.status}).` });
    };
    xhr.onerror = () => resolve({ kind: "error", status: 0, message: "The upload was interrupted (network error). Nothing was imported; try again." });
    xhr.onabort = () => resolve({ kind: "error", status: 0, message: "The upload was cancelled." });
    const form = new FormData();
    // Small fields first, so the server reads them before the file's bytes.
    form.append("mapping", JSON.stringify(settings));
    form.append("file", file, file.name);
    xhr.send(form);
  });
  return { done, abort: () => xhr.abort() };
}
