"use client";

import Link from "next/link";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState, useTransition, type KeyboardEvent } from "react";
import { LABEL_META } from "@/lib/ui/label-badge";
import { FormMessage } from "@/lib/ui/field";
import type { DateRange, Label } from "@/features/review/schemas";
import { postOverride, postReviewed, queueOptions, reviewKeys, type ChangeOutcome } from "@/features/review/queries";
import { KeyHelp, useReviewKeys } from "@/features/review/components/review-keys";
import { dayTitle } from "@/features/review/calendar-grid";
import { ANOMALY_GLYPH, WEAK_GLYPH } from "@/features/review/flags";

/**
 * The review queue: the evenings of a period that most need a person first. Driven from the
 * keyboard: j/k or arrows move, 1-4 or l/s/a/u choose a label and open the note, Ctrl+Enter
 * saves, r marks reviewed, Enter opens the evening, ? lists the keys.
 */
export function ReviewQueue({ siteId, range, canEdit }: { siteId: number; range: DateRange; canEdit: boolean }) {
  const query = useQuery(queueOptions(siteId, range));
  const queryClient = useQueryClient();
  const router = useRouter();
  const items = query.data ?? [];
  const [index, setIndex] = useState(0);
  const [choice, setChoice] = useState<Label | null>(null);
  const [note, setNote] = useState("");
  const [message, setMessage] = useState<{ tone: "info" | "error"; text: string } | null>(null);
  const [pending, startTransition] = useTransition();
  const noteRef = useRef<HTMLTextAreaElement>(null);
  const helpRef = useRef<HTMLDialogElement>(null);
  const listRef = useRef<HTMLOListElement>(null);
  const current = items[Math.min(index, Math.max(0, items.length - 1))];

  useEffect(() => {
    listRef.current?.querySelector(`[data-index="${index}"]`)?.scrollIntoView({ block: "nearest" });
  }, [index]);

  function move(delta: number) {
    setIndex((i) => Math.min(Math.max(0, items.length - 1), Math.max(0, i + delta)));
    setChoice(null);
    setNote("");
    setMessage(null);
  }

  function settle(outcome: ChangeOutcome, done: string) {
    if (outcome.ok) {
      setMessage({ tone: "info", text: done });
      setChoice(null);
      setNote("");
      noteRef.current?.blur();
    } else {
      const newer = outcome.conflict ? ` Newer label: ${LABEL_META[outcome.conflict.label].name}.` : "";
      setMessage({ tone: "error", text: `${outcome.message}${newer}` });
    }
    void queryClient.invalidateQueries({ queryKey: reviewKeys.site(siteId) });
  }

  function save() {
    if (!current || !choice) return;
    if (note.trim() === "") {
      setMessage({ tone: "error", text: "Write a note: why is the label different?" });
      noteRef.current?.focus();
      return;
    }
    const target = current;
    startTransition(async () =>
      settle(await postOverride(target.id, { label: choice, note, version: target.version }), `${target.date}: saved as ${LABEL_META[choice].name}.`),
    );
  }

  function reviewed() {
    if (!current || current.reviewed) return;
    const target = current;
    startTransition(async () => settle(await postReviewed(target.id, { version: target.version }), `${target.date}: marked reviewed.`));
  }

  useReviewKeys(
    {
      next: () => move(1),
      previous: () => move(-1),
      label: canEdit
        ? (l) => {
            if (!current || l === current.label) return;
            setChoice(l);
            requestAnimationFrame(() => noteRef.current?.focus());
          }
        : undefined,
      note: canEdit ? () => noteRef.current?.focus() : undefined,
      reviewed: canEdit ? reviewed : undefined,
      open: () => current && router.push(`/sites/${siteId}/evenings/${current.id}`),
      help: () => helpRef.current?.showModal(),
    },
    { arrows: true },
  );

  function noteKeys(ev: KeyboardEvent<HTMLTextAreaElement>) {
    if (ev.key === "Enter" && (ev.ctrlKey || ev.metaKey)) save();
    if (ev.key === "Escape") {
      setChoice(null);
      noteRef.current?.blur();
    }
  }

  const open = items.filter((i) => !i.reviewed && i.source === "auto").length;

  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_22rem]">
      <section aria-labelledby="queue-title" className="card min-w-0 p-0">
        <div className="flex items-center justify-between border-b border-line px-4 py-3">
          <h2 id="queue-title" className="text-sm font-semibold">
            {query.isPending ? "Loading…" : `${items.length} evenings · ${open} waiting for a person`}
          </h2>
          <button type="button" className="text-xs text-ink-muted hover:underline" onClick={() => helpRef.current?.showModal()}>
            Keys <kbd className="rounded border border-line px-1 font-mono">?</kbd>
          </button>
        </div>
        {query.isError ? (
          <p role="alert" className="p-4 text-sm text-red-700 dark:text-red-300">
            The queue could not be loaded: {query.error.message}
          </p>
        ) : null}
        {items.length === 0 && !query.isPending ? <p className="p-6 text-sm text-ink-muted">No evenings in this period.</p> : null}
        <ol ref={listRef} className="max-h-[70vh] divide-y divide-line overflow-y-auto" aria-label="Evenings by need of review">
          {items.map((it, i) => {
            const selected = current?.id === it.id;
            return (
              <li
                key={it.id}
                data-index={i}
                aria-current={selected ? "true" : undefined}
                className={`flex items-center gap-3 px-4 py-2.5 text-sm ${selected ? "bg-dusk-50 shadow-[inset_3px_0_0_var(--color-dusk-600)] dark:bg-dusk-900/60" : ""} ${it.reviewed || it.source === "override" ? "text-ink-muted" : ""}`}
              >
                <span className="w-6 text-right font-mono text-xs text-ink-muted tabular-nums">{i + 1}</span>
                <span aria-hidden="true" className={`inline-grid size-6 shrink-0 place-items-center rounded font-mono text-xs font-bold ${LABEL_META[it.label].swatch}`}>
                  {LABEL_META[it.label].glyph}
                </span>
                <span className="min-w-0 flex-1">
                  <Link href={`/sites/${siteId}/evenings/${it.id}`} className="font-medium text-ink hover:underline">
                    {dayTitle(it.date)}
                  </Link>
                  <span className="sr-only">: {LABEL_META[it.label].name}. </span>
                  <span className="block truncate text-xs text-ink-muted" title={it.why}>
                    {it.why}
                  </span>
                </span>
                {it.anomalyCount || it.weakTurbulence ? (
                  <span aria-hidden="true" className="shrink-0 text-xs" title="anomalies or weak turbulence: see the reason">
                    {it.anomalyCount ? ANOMALY_GLYPH : ""}
                    {it.weakTurbulence ? WEAK_GLYPH : ""}
                  </span>
                ) : null}
                <span className="shrink-0 text-xs" aria-label={it.reviewed ? "reviewed" : "not reviewed"}>
                  {it.source === "override" ? "✎ " : ""}
                  {it.reviewed ? "✓" : "•"}
                </span>
              </li>
            );
          })}
        </ol>
      </section>

      <aside aria-labelledby="current-title" className="card h-fit space-y-4 p-5 lg:sticky lg:top-6">
        {current ? (
          <>
            <div>
              <h2 id="current-title" className="text-base font-semibold">
                {dayTitle(current.date)}
              </h2>
              <p className="text-xs text-ink-muted">
                {LABEL_META[current.label].name}
                {current.source === "override" ? ` (rules: ${LABEL_META[current.autoLabel].name})` : current.rule ? ` · ${current.rule}` : ""} ·{" "}
                {current.reviewed ? "reviewed" : "not yet reviewed"}
              </p>
              <p className="mt-2 text-sm">{current.why}</p>
            </div>
            <Link href={`/sites/${siteId}/evenings/${current.id}`} className="btn-quiet w-full">
              Open evening <kbd className="font-mono text-[10px] text-ink-muted">Enter</kbd>
            </Link>
            {message ? <FormMessage tone={message.tone}>{message.text}</FormMessage> : null}
            {canEdit ? (
              <div className="space-y-2">
                <p className="text-sm">
                  {choice ? (
                    <>
                      New label: <strong>{LABEL_META[choice].name}</strong>
                    </>
                  ) : (
                    <span className="text-ink-muted">Press 1-4 (or l/s/a/u) to set a label, r to mark reviewed.</span>
                  )}
                </p>
                <label htmlFor="queue-note" className="block text-sm font-medium">
                  Note <span className="font-normal text-ink-muted">(required for a new label)</span>
                </label>
                <textarea
                  id="queue-note"
                  ref={noteRef}
                  value={note}
                  onChange={(e) => setNote(e.target.value)}
                  onKeyDown={noteKeys}
                  className="field-input min-h-20"
                  maxLength={2000}
                />
                <div className="flex flex-wrap gap-2">
                  <button type="button" className="btn-primary" onClick={save} disabled={pending || !choice}>
                    {pending ? "Saving…" : "Save override"}
                  </button>
                  <button type="button" className="btn-quiet" onClick={reviewed} disabled={pending || current.reviewed}>
                    Mark reviewed <kbd className="font-mono text-[10px] text-ink-muted">r</kbd>
                  </button>
                </div>
              </div>
            ) : (
              <p className="text-sm text-ink-muted">Viewers read the queue; analysts and leads change labels.</p>
            )}
          </>
        ) : (
          <h2 id="current-title" className="text-sm text-ink-muted">
            Nothing selected
          </h2>
        )}
      </aside>
      <KeyHelp dialogRef={helpRef} />
    </div>
  );
}
