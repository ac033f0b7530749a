"use client";

import { useRouter } from "next/navigation";
import { useId, useRef, useState, useTransition, type DragEvent } from "react";
import type { ImportSettings, ImportSummary, ImportTemplate, JobView } from "@/features/imports/schemas";
import {
  PREVIEW_BYTES,
  TARGET_OPTIONS,
  canonicalUnitOf,
  initialMapping,
  mappingFromRows,
  mappingProblems,
  previewFile,
  type MappingRow,
  type Preview,
} from "@/features/imports/preview";
import { uploadFile } from "@/features/imports/queries";
import type { ImportActionState } from "@/features/imports/server/actions";
import { Bar, JobProgress } from "@/features/imports/components/job-progress";
import { ReportView } from "@/features/imports/components/report-view";

type Stage =
  | { kind: "idle" }
  | { kind: "ready"; file: File; preview: Preview }
  | { kind: "uploading"; file: File; sent: number; total: number }
  | { kind: "job"; file: File; jobId: number; importId: number }
  | { kind: "settled"; file: File; job: JobView }
  | { kind: "message"; tone: "info" | "error"; text: string };

const nf = new Intl.NumberFormat("en-GB");
const mb = (n: number) => `${(n / 1e6).toFixed(n < 1e7 ? 2 : 1)} MB`;

/**
 * The import screen's working area: pick or drop a CSV, check the preview and mapping, upload
 * with a progress bar, follow the import job, and read its report or answer its overlap question.
 */
export function ImportWorkbench({
  siteId,
  siteUtcOffsetHours,
  template,
  maxBytes,
  resolveOverlap,
}: {
  siteId: number;
  siteUtcOffsetHours: number;
  template: ImportTemplate | null;
  maxBytes: number;
  resolveOverlap: (siteId: number, importId: number, choice: string) => Promise<ImportActionState>;
}) {
  const router = useRouter();
  const inputId = useId();
  const fileInput = useRef<HTMLInputElement>(null);
  const [stage, setStage] = useState<Stage>({ kind: "idle" });
  const [dragging, setDragging] = useState(false);
  const [rows, setRows] = useState<MappingRow[]>([]);
  const [missing, setMissing] = useState((template?.missingCodes ?? ["-9999", "NA", "NaN"]).join(", "));
  const [convention, setConvention] = useState<"start" | "end">(template?.timestampConvention ?? "end");
  const [offset, setOffset] = useState(String(template?.utcOffsetHours ?? siteUtcOffsetHours));
  const [saveTemplate, setSaveTemplate] = useState(true);
  const [pending, startTransition] = useTransition();

  async function choose(file: File | undefined) {
    if (!file) return;
    if (file.size > maxBytes) {
      setStage({ kind: "message", tone: "error", text: `${file.name} is ${mb(file.size)}, more than the upload limit of ${mb(maxBytes)}. Split it into parts (e.g. one per year).` });
      return;
    }
    const text = await file.slice(0, PREVIEW_BYTES).text();
    const preview = previewFile(text, file.size > PREVIEW_BYTES);
    setRows(initialMapping(preview, template));
    setStage({ kind: "ready", file, preview });
  }

  function onDrop(e: DragEvent<HTMLElement>) {
    e.preventDefault();
    setDragging(false);
    void choose(e.dataTransfer.files[0]);
  }

  const problems = stage.kind === "ready" ? mappingProblems(rows) : [];
  const offsetNumber = Number(offset.replace(",", "."));
  const offsetValid = Number.isFinite(offsetNumber) && Math.abs(offsetNumber) <= 14 && Number.isInteger(offsetNumber * 4);
  const singleStamp = rows.some((r) => r.target === "TIMESTAMP" || r.target === "DATE" || r.target === "TIME");

  function upload() {
    if (stage.kind !== "ready") return;
    const file = stage.file;
    const settings: ImportSettings = {
      columns: mappingFromRows(rows),
      missingCodes: missing.split(",").map((s) => s.trim()).filter((s, i, a) => a.indexOf(s) === i).concat([""]),
      timestampConvention: convention,
      utcOffsetHours: offsetNumber,
      overlap: "ask",
      saveTemplate,
    };
    setStage({ kind: "uploading", file, sent: 0, total: file.size });
    const { done } = uploadFile(siteId, file, settings, (sent, total) => setStage((s) => (s.kind === "uploading" ? { ...s, sent, total } : s)));
    void done.then((answer) => {
      if (answer.kind === "queued") setStage({ kind: "job", file, jobId: answer.jobId, importId: answer.importId });
      else if (answer.kind === "already") setStage({ kind: "message", tone: "info", text: answer.message });
      else setStage({ kind: "message", tone: "error", text: answer.message });
      router.refresh();
    });
  }

  function answerOverlap(importId: number, choice: "replace" | "keep" | "cancel", file: File) {
    startTransition(async () => {
      const r = await resolveOverlap(siteId, importId, choice);
      if (!r.ok) setStage({ kind: "message", tone: "error", text: r.message ?? "That did not work." });
      else if (r.jobId) setStage({ kind: "job", file, jobId: r.jobId, importId });
      else setStage({ kind: "message", tone: "info", text: "Cancelled: nothing was written; the stored data is unchanged." });
      router.refresh();
    });
  }

  const reset = () => {
    setStage({ kind: "idle" });
    if (fileInput.current) fileInput.current.value = "";
  };

  return (
    <div className="space-y-6">
      {stage.kind === "idle" || stage.kind === "message" ? (
        <>
          {stage.kind === "message" ? (
            <p role={stage.tone === "error" ? "alert" : "status"} className={`rounded-lg border p-3 text-sm ${stage.tone === "error" ? "border-red-300 bg-red-50 text-red-900 dark:border-red-800 dark:bg-red-950/40 dark:text-red-100" : "border-line bg-surface-sunken"}`}>
              {stage.text}
            </p>
          ) : null}
          <label
            htmlFor={inputId}
            onDragOver={(e) => {
              e.preventDefault();
              setDragging(true);
            }}
            onDragLeave={() => setDragging(false)}
            onDrop={onDrop}
            className={`flex cursor-pointer flex-col items-center justify-center gap-2 rounded-xl border-2 border-dashed px-6 py-12 text-center transition-colors ${dragging ? "border-dusk-500 bg-dusk-50 dark:bg-dusk-950/40" : "border-line bg-surface-raised hover:bg-surface-sunken"}`}
          >
            <span aria-hidden="true" className="text-3xl text-dusk-600 dark:text-dusk-300">
              ⇪
            </span>
            <span className="font-medium">Drop a half-hourly CSV here, or choose a file</span>
            <span className="text-xs text-ink-muted">Up to {mb(maxBytes)}. The first rows are read in your browser before anything is sent.</span>
            <input id={inputId} ref={fileInput} type="file" accept=".csv,.txt,.dat,text/csv,text/plain" className="sr-only" onChange={(e) => void choose(e.target.files?.[0])} />
          </label>
        </>
      ) : null}

      {stage.kind === "ready" ? (
        <div className="space-y-6">
          <FileLine file={stage.file} onClear={reset} />
          {stage.preview.problem ? (
            <p role="alert" className="rounded-lg border border-amber-300 bg-amber-50 p-3 text-sm text-amber-950 dark:border-amber-700 dark:bg-amber-950/40 dark:text-amber-100">
              {stage.preview.problem}
            </p>
          ) : null}
          {stage.preview.headers.length > 0 ? <PreviewTable preview={stage.preview} /> : null}
          {stage.preview.headers.length > 0 ? (
            <section aria-labelledby="mapping-title" className="space-y-3">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h3 id="mapping-title" className="font-semibold">
                  Column mapping
                </h3>
                <p className="text-xs text-ink-muted">{template ? "Filled from this site's saved mapping where the headers match, else recognised." : "Recognised from the column names; change anything that is wrong."}</p>
              </div>
              <MappingEditor rows={rows} guesses={stage.preview} onChange={setRows} />
            </section>
          ) : null}
          <section aria-labelledby="options-title" className="grid gap-4 sm:grid-cols-3">
            <h3 id="options-title" className="sr-only">
              Reading options
            </h3>
            <label className="space-y-1 text-sm">
              <span className="block font-medium">Missing-value codes</span>
              <input className="field-input" value={missing} onChange={(e) => setMissing(e.target.value)} aria-describedby="missing-hint" />
              <span id="missing-hint" className="block text-xs text-ink-muted">
                Comma-separated; empty cells are always missing.
              </span>
            </label>
            <label className="space-y-1 text-sm">
              <span className="block font-medium">A single timestamp marks</span>
              <select className="field-input" value={convention} onChange={(e) => setConvention(e.target.value === "start" ? "start" : "end")} aria-describedby="conv-hint">
                <option value="end">the end of the period (usual for loggers)</option>
                <option value="start">the start of the period</option>
              </select>
              <span id="conv-hint" className="block text-xs text-ink-muted">
                {singleStamp ? "Used for this file's timestamp column." : "Not needed: this file has start/end columns."}
              </span>
            </label>
            <label className="space-y-1 text-sm">
              <span className="block font-medium">Data clock, hours from UTC</span>
              <input className="field-input" inputMode="decimal" value={offset} onChange={(e) => setOffset(e.target.value)} aria-invalid={!offsetValid} aria-describedby="offset-hint" />
              <span id="offset-hint" className="block text-xs text-ink-muted">
                {offsetValid ? `The site's clock is UTC${siteUtcOffsetHours >= 0 ? "+" : ""}${siteUtcOffsetHours}.` : "A whole number of quarter hours between -14 and +14."}
              </span>
            </label>
          </section>
          {problems.length > 0 ? (
            <ul role="alert" className="list-disc space-y-1 pl-5 text-sm text-red-800 dark:text-red-300">
              {problems.map((p) => (
                <li key={p}>{p}</li>
              ))}
            </ul>
          ) : null}
          <div className="flex flex-wrap items-center justify-between gap-3 border-t border-line pt-4">
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={saveTemplate} onChange={(e) => setSaveTemplate(e.target.checked)} className="size-4" />
              Save this mapping for the site
            </label>
            <div className="flex gap-2">
              <button type="button" className="btn-quiet" onClick={reset}>
                Choose another file
              </button>
              <button type="button" className="btn-primary" disabled={problems.length > 0 || !offsetValid} onClick={upload}>
                Upload and import
              </button>
            </div>
          </div>
        </div>
      ) : null}

      {stage.kind === "uploading" ? (
        <div className="space-y-3" data-testid="upload-progress">
          <FileLine file={stage.file} />
          <Bar label="Uploading" value={stage.sent} max={stage.total} text={`${mb(stage.sent)} / ${mb(stage.total)} - ${stage.total > 0 ? Math.round((stage.sent / stage.total) * 100) : 0} %`} />
        </div>
      ) : null}

      {stage.kind === "job" ? (
        <div className="space-y-3">
          <FileLine file={stage.file} />
          <Bar label="Uploaded" value={1} max={1} text="100 %" />
          <JobProgress jobId={stage.jobId} onSettled={(job) => {
            setStage({ kind: "settled", file: stage.file, job });
            router.refresh();
          }} />
        </div>
      ) : null}

      {stage.kind === "settled" ? (
        <Outcome job={stage.job} siteId={siteId} pending={pending} onChoice={(importId, c) => answerOverlap(importId, c, stage.file)} onAnother={reset} />
      ) : null}
    </div>
  );
}

function FileLine({ file, onClear }: { file: File; onClear?: () => void }) {
  return (
    <div className="flex items-center justify-between gap-3 rounded-lg bg-surface-sunken px-4 py-2.5 text-sm">
      <span className="min-w-0 truncate">
        <span className="font-medium">{file.name}</span> <span className="text-ink-muted">- {mb(file.size)}</span>
      </span>
      {onClear ? (
        <button type="button" className="text-xs text-ink-muted underline" onClick={onClear}>
          Remove
        </button>
      ) : null}
    </div>
  );
}

function PreviewTable({ preview }: { preview: Preview }) {
  return (
    <section aria-labelledby="preview-title" className="space-y-2">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 id="preview-title" className="font-semibold">
          First rows
        </h3>
        <p className="text-xs text-ink-muted">
          Header on line {preview.headerLine}
          {preview.unitsRow ? ", units row under it" : ""}; delimiter {preview.delimiter === "\t" ? "tab" : `"${preview.delimiter}"`}; {preview.headers.length} columns.
        </p>
      </div>
      <div className="max-h-80 overflow-auto rounded-lg border border-line">
        <table className="min-w-full text-left font-mono text-xs">
          <thead className="sticky top-0 bg-surface-sunken">
            <tr>
              {preview.headers.map((h, i) => (
                <th key={`${h}-${i}`} scope="col" className="px-2 py-1.5 font-semibold whitespace-nowrap">
                  {h}
                  {preview.unitsRow?.[i] ? <span className="block font-normal text-ink-muted">{preview.unitsRow[i]}</span> : null}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {preview.rows.map((r, i) => (
              <tr key={i}>
                {preview.headers.map((_, j) => (
                  <td key={j} className="px-2 py-1 whitespace-nowrap tabular-nums">
                    {r[j] ?? ""}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

function MappingEditor({ rows, guesses, onChange }: { rows: MappingRow[]; guesses: Preview; onChange: (rows: MappingRow[]) => void }) {
  const set = (i: number, patch: Partial<MappingRow>) => onChange(rows.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  const known = new Set(TARGET_OPTIONS.flatMap((g) => g.options.map((o) => o.value)));
  return (
    <div className="overflow-x-auto rounded-lg border border-line">
      <table className="min-w-full text-left text-sm">
        <thead className="bg-surface-sunken text-xs tracking-wide text-ink-muted uppercase">
          <tr>
            <th scope="col" className="px-3 py-2">Column in the file</th>
            <th scope="col" className="px-3 py-2">Read as</th>
            <th scope="col" className="px-3 py-2">Unit in the file</th>
            <th scope="col" className="px-3 py-2">Recognised</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {rows.map((r, i) => {
            const g = guesses.guesses[i];
            const custom = r.target !== "" && !known.has(r.target);
            return (
              <tr key={`${r.header}-${i}`}>
                <td className="px-3 py-1.5 font-mono text-xs">{r.header || <em className="text-ink-muted">(no name)</em>}</td>
                <td className="px-3 py-1.5">
                  <div className="flex gap-2">
                    <select
                      aria-label={`Read ${r.header} as`}
                      className="field-input py-1"
                      value={custom ? "__tracer" : r.target}
                      onChange={(e) => set(i, { target: e.target.value === "__tracer" ? "TRACER" : e.target.value })}
                    >
                      <option value="">(leave out)</option>
                      {TARGET_OPTIONS.map((grp) => (
                        <optgroup key={grp.group} label={grp.group}>
                          {grp.options.map((o) => (
                            <option key={o.value} value={o.value}>
                              {o.label}
                            </option>
                          ))}
                        </optgroup>
                      ))}
                      <option value="__tracer">Tracer series (name it)...</option>
                    </select>
                    {custom ? (
                      <input aria-label={`Tracer name for ${r.header}`} className="field-input w-32 py-1 font-mono" value={r.target} onChange={(e) => set(i, { target: e.target.value.toUpperCase() })} />
                    ) : null}
                  </div>
                </td>
                <td className="px-3 py-1.5">
                  <input
                    aria-label={`Unit of ${r.header}`}
                    className="field-input w-36 py-1"
                    value={r.unit}
                    placeholder={canonicalUnitOf(r.target) || (r.target.startsWith("TIMESTAMP") || r.target === "DATE" || r.target === "TIME" ? "" : "unit")}
                    disabled={r.target === "" || r.target.startsWith("TIMESTAMP") || r.target === "DATE" || r.target === "TIME"}
                    onChange={(e) => set(i, { unit: e.target.value })}
                  />
                </td>
                <td className="px-3 py-1.5 text-xs text-ink-muted">
                  {g?.variable ? `${g.variable}${g.gapFilled ? " (gap-filled)" : ""}${g.unit ? `, ${g.unit}` : ""}` : "not recognised"}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function Outcome({
  job,
  siteId,
  pending,
  onChoice,
  onAnother,
}: {
  job: JobView;
  siteId: number;
  pending: boolean;
  onChoice: (importId: number, choice: "replace" | "keep" | "cancel") => void;
  onAnother: () => void;
}) {
  const imp: ImportSummary | null = job.import;
  const report = imp?.report ?? null;
  const href = imp ? `/api/sites/${siteId}/imports/${imp.id}/rejected` : "#";
  return (
    <div className="space-y-4" data-testid="import-outcome" data-status={imp?.status ?? job.status}>
      {imp?.status === "pending" && report?.overlap ? (
        <div role="alertdialog" aria-labelledby="overlap-title" className="space-y-3 rounded-xl border border-amber-300 bg-amber-50 p-4 dark:border-amber-700 dark:bg-amber-950/40">
          <h3 id="overlap-title" className="font-semibold">
            This file overlaps data already stored
          </h3>
          <p className="text-sm">
            {nf.format(report.overlap.existingRows)} half-hours between {report.overlap.from.slice(0, 16).replace("T", " ")} and {report.overlap.to.slice(0, 16).replace("T", " ")} UTC are already stored for this site. Nothing has been written yet.
          </p>
          <div className="flex flex-wrap gap-2">
            <button type="button" className="btn-primary" autoFocus disabled={pending} onClick={() => onChoice(imp.id, "cancel")}>
              Cancel (keep everything as it is)
            </button>
            <button type="button" className="btn-quiet" disabled={pending} onClick={() => onChoice(imp.id, "replace")}>
              Replace the overlap with this file
            </button>
            <button type="button" className="btn-quiet" disabled={pending} onClick={() => onChoice(imp.id, "keep")}>
              Keep stored values, add only new periods
            </button>
          </div>
        </div>
      ) : job.status === "failed" ? (
        <p role="alert" className="rounded-lg border border-red-300 bg-red-50 p-3 text-sm text-red-900 dark:border-red-800 dark:bg-red-950/40 dark:text-red-100">
          {job.message}
        </p>
      ) : imp?.status === "landed" ? (
        <p role="status" className="rounded-lg border border-emerald-300 bg-emerald-50 p-3 text-sm text-emerald-950 dark:border-emerald-800 dark:bg-emerald-950/40 dark:text-emerald-100">
          Imported {nf.format(imp.rowsWritten)} half-hours from {imp.originalName}
          {report?.evenings ? ` and classified ${nf.format(report.evenings.computed)} evenings` : ""}.
        </p>
      ) : null}
      {report ? <ReportView report={report} rejectedHref={href} /> : null}
      <button type="button" className="btn-quiet" onClick={onAnother}>
        Import another file
      </button>
    </div>
  );
}
