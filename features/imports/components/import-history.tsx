"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import type { ImportStatus, ImportSummary } from "@/features/imports/schemas";
import type { ImportActionState } from "@/features/imports/server/actions";
import { ReportView } from "@/features/imports/components/report-view";

const STATUS: Record<ImportStatus, { text: string; mark: string; tone: string }> = {
  pending: { text: "Waiting for a choice", mark: "?", tone: "text-amber-800 dark:text-amber-300" },
  queued: { text: "Queued", mark: "…", tone: "text-ink-muted" },
  running: { text: "Importing", mark: "…", tone: "text-ink-muted" },
  landed: { text: "Imported", mark: "✓", tone: "text-emerald-800 dark:text-emerald-300" },
  failed: { text: "Failed", mark: "✕", tone: "text-red-800 dark:text-red-300" },
  refused: { text: "Refused", mark: "✕", tone: "text-red-800 dark:text-red-300" },
  deleted: { text: "Rows deleted (original kept)", mark: "–", tone: "text-ink-muted" },
  purged: { text: "Purged", mark: "–", tone: "text-ink-muted" },
};

const nf = new Intl.NumberFormat("en-GB");
const mb = (n: number) => `${(n / 1e6).toFixed(n < 1e7 ? 2 : 1)} MB`;
const day = (iso: string | null) => (iso ? iso.slice(0, 10) : "?");

/** The site's imports, newest first, each with its report; delete and purge where the role allows. */
export function ImportHistory({
  siteId,
  imports,
  canDelete,
  canPurge,
  deleteImport,
}: {
  siteId: number;
  imports: ImportSummary[];
  canDelete: boolean;
  canPurge: boolean;
  deleteImport: (siteId: number, importId: number, purge: boolean) => Promise<ImportActionState>;
}) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [note, setNote] = useState<string | null>(null);
  if (imports.length === 0) return <p className="text-sm text-ink-muted italic">No imports yet.</p>;

  const act = (imp: ImportSummary, purge: boolean) => {
    const question = purge
      ? `Purge ${imp.originalName}? Its rows AND the stored original file are removed for good.`
      : `Delete the rows of ${imp.originalName}? The original file is kept and can be imported again.`;
    if (!window.confirm(question)) return;
    startTransition(async () => {
      const r = await deleteImport(siteId, imp.id, purge);
      setNote(r.message ?? null);
      router.refresh();
    });
  };

  return (
    <div className="space-y-3">
      {note ? (
        <p role="status" className="text-sm text-ink-muted">
          {note}
        </p>
      ) : null}
      <ul className="divide-y divide-line rounded-xl border border-line bg-surface-raised" data-testid="import-history">
        {imports.map((imp) => {
          const s = STATUS[imp.status];
          return (
            <li key={imp.id} className="p-4">
              <details>
                <summary className="flex cursor-pointer list-none flex-wrap items-center justify-between gap-3">
                  <span className="min-w-0">
                    <span className="block truncate font-medium">{imp.originalName}</span>
                    <span className="text-xs text-ink-muted">
                      {mb(imp.sizeBytes)} · {imp.createdAt.slice(0, 16).replace("T", " ")} UTC{imp.createdBy ? ` · ${imp.createdBy}` : ""}
                      {imp.firstStartUtc ? ` · data ${day(imp.firstStartUtc)} to ${day(imp.lastStartUtc)}` : ""}
                      {imp.status === "landed" ? ` · ${nf.format(imp.rowsWritten)} rows` : ""}
                    </span>
                  </span>
                  <span className={`text-sm font-medium ${s.tone}`}>
                    <span aria-hidden="true">{s.mark}</span> {s.text}
                  </span>
                </summary>
                <div className="mt-4 space-y-4">
                  {imp.report ? <ReportView report={imp.report} rejectedHref={`/api/sites/${siteId}/imports/${imp.id}/rejected`} /> : <p className="text-sm text-ink-muted">No report yet.</p>}
                  <p className="font-mono text-xs break-all text-ink-muted">SHA-256 {imp.sha256}</p>
                  {(canDelete && imp.status === "landed") || (canPurge && (imp.status === "landed" || imp.status === "deleted" || imp.status === "refused" || imp.status === "failed")) ? (
                    <div className="flex gap-2">
                      {canDelete && imp.status === "landed" ? (
                        <button type="button" className="btn-quiet" disabled={pending} onClick={() => act(imp, false)}>
                          Delete rows
                        </button>
                      ) : null}
                      {canPurge ? (
                        <button type="button" className="btn-danger" disabled={pending} onClick={() => act(imp, true)}>
                          Purge file and rows
                        </button>
                      ) : null}
                    </div>
                  ) : null}
                </div>
              </details>
            </li>
          );
        })}
      </ul>
    </div>
  );
}
