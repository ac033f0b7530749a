"use client";

import { useActionState } from "react";
import type { ImportActionState } from "@/features/imports/server/actions";
import { JobProgress } from "@/features/imports/components/job-progress";

/** Recompute the evenings of a chosen period with the site's active rule set, with progress. */
export function RecomputePanel({
  siteId,
  defaultFrom,
  defaultTo,
  action,
}: {
  siteId: number;
  defaultFrom: string;
  defaultTo: string;
  action: (prev: ImportActionState, formData: FormData) => Promise<ImportActionState>;
}) {
  const [state, formAction, pending] = useActionState(action, { ok: false });
  return (
    <form action={formAction} className="space-y-3">
      <input type="hidden" name="siteId" value={siteId} />
      <div className="grid grid-cols-2 gap-3">
        <label className="space-y-1 text-sm">
          <span className="block font-medium">From</span>
          <input type="date" name="from" required defaultValue={defaultFrom} className="field-input" aria-invalid={Boolean(state.fieldErrors?.from)} />
        </label>
        <label className="space-y-1 text-sm">
          <span className="block font-medium">To</span>
          <input type="date" name="to" required defaultValue={defaultTo} className="field-input" aria-invalid={Boolean(state.fieldErrors?.to)} aria-describedby="recompute-error" />
        </label>
      </div>
      {state.fieldErrors?.to || state.fieldErrors?.from || (!state.ok && state.message) ? (
        <p id="recompute-error" className="text-sm text-red-700 dark:text-red-300">
          {[...(state.fieldErrors?.from ?? []), ...(state.fieldErrors?.to ?? [])].join(" ") || state.message}
        </p>
      ) : null}
      <button type="submit" className="btn-quiet w-full" disabled={pending}>
        Recompute evenings
      </button>
      {state.ok && state.jobId ? <JobProgress key={state.jobId} jobId={state.jobId} /> : null}
    </form>
  );
}
