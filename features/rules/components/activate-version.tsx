"use client";

import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";

// the shape of GET /api/jobs/:id
type JobView = { status: string; phase: string; progress: { done: number; total: number }; message: string | null };

/** A lead picks the version a site classifies with; the re-labelling job's progress follows. */
export function ActivateVersion({
  site,
  versions,
}: {
  site: { id: number; name: string; activeRuleSetId: number | null };
  versions: Array<{ id: number; version: number }>;
}) {
  const router = useRouter();
  const [choice, setChoice] = useState(site.activeRuleSetId ?? versions[0]?.id ?? 0);
  const [jobId, setJobId] = useState<number | null>(null);
  const [job, setJob] = useState<JobView | null>(null);
  const [problem, setProblem] = useState<string | null>(null);

  useEffect(() => {
    if (jobId === null) return;
    let stop = false;
    const tick = async () => {
      const res = await fetch(`/api/jobs/${jobId}`);
      if (!res.ok || stop) return;
      const { job: j } = (await res.json()) as { job: JobView };
      setJob(j);
      if (j.status === "done" || j.status === "failed" || j.status === "cancelled") {
        router.refresh();
        return;
      }
      setTimeout(() => void tick(), 1000);
    };
    void tick();
    return () => {
      stop = true;
    };
  }, [jobId, router]);

  const activate = async () => {
    setProblem(null);
    const res = await fetch(`/api/rule-sets/${choice}/activate`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ siteId: site.id }),
    });
    const body = (await res.json().catch(() => ({}))) as { jobId?: number; error?: { message: string } };
    if (!res.ok || body.jobId === undefined) setProblem(body.error?.message ?? "Activation failed.");
    else setJobId(body.jobId);
  };

  const pct = job && job.progress.total > 0 ? Math.round((100 * job.progress.done) / job.progress.total) : 0;
  return (
    <div className="flex flex-wrap items-center gap-2 text-sm">
      <label className="sr-only" htmlFor={`activate-${site.id}`}>
        Version for {site.name}
      </label>
      <select id={`activate-${site.id}`} value={choice} onChange={(e) => setChoice(Number(e.target.value))} className="field-input w-auto py-1">
        {versions.map((v) => (
          <option key={v.id} value={v.id}>
            v{v.version}
          </option>
        ))}
      </select>
      <button type="button" className="btn-quiet px-2.5 py-1 text-xs" disabled={choice === site.activeRuleSetId && jobId === null} onClick={() => void activate()}>
        Activate and re-label
      </button>
      {job ? (
        <span role="status" className="flex items-center gap-2 text-xs text-ink-muted">
          <progress max={100} value={pct} className="h-2 w-24" aria-label="re-labelling progress" />
          {job.status === "done" ? "done" : job.status === "failed" ? `failed: ${job.message ?? ""}` : `${job.phase} ${pct}%`}
        </span>
      ) : null}
      {problem ? (
        <span role="alert" className="text-xs text-red-700 dark:text-red-300">
          {problem}
        </span>
      ) : null}
    </div>
  );
}
