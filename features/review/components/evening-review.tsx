"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useRef, useState, useTransition, type FormEvent, type KeyboardEvent } from "react";
import { LABEL_META, LABEL_ORDER } from "@/lib/ui/label-badge";
import { FormMessage } from "@/lib/ui/field";
import type { Label } from "@/features/review/schemas";
import { postOverride, postReviewed, postRevert, reviewKeys, type ChangeOutcome } from "@/features/review/queries";
import { KeyHelp, useReviewKeys } from "@/features/review/components/review-keys";

type Props = {
  siteId: number;
  eveningId: number;
  label: Label;
  autoLabel: Label;
  source: "auto" | "override";
  version: number;
  reviewed: boolean;
  canEdit: boolean;
  canRevert: boolean;
  previousHref: string | null;
  nextHref: string | null;
};

/**
 * The label panel of the evening page: override with a required note, revert (lead), mark
 * reviewed, and the page's review keys. After a change the server page refreshes, so the history
 * and the version shown are the stored ones.
 */
export function EveningReview(p: Props) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const [choice, setChoice] = useState<Label | null>(null);
  const [note, setNote] = useState("");
  const [problem, setProblem] = useState<{ message: string; newer?: { label: Label; version: number; by: string | null } } | null>(null);
  const [noteError, setNoteError] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  const noteRef = useRef<HTMLTextAreaElement>(null);
  const helpRef = useRef<HTMLDialogElement>(null);

  function settle(outcome: ChangeOutcome, done: string) {
    if (outcome.ok) {
      setProblem(null);
      setNoteError(null);
      setChoice(null);
      setNote("");
      setSaved(done);
      // Back to page-level keys (j/k, ?) once the note is saved.
      noteRef.current?.blur();
      void queryClient.invalidateQueries({ queryKey: reviewKeys.site(p.siteId) });
      router.refresh();
      return;
    }
    setSaved(null);
    if (outcome.fieldErrors?.note?.[0]) setNoteError(outcome.fieldErrors.note[0]);
    setProblem({ message: outcome.message, newer: outcome.conflict ?? undefined });
  }

  function pickLabel(l: Label) {
    if (!p.canEdit) return;
    setChoice(l);
    setSaved(null);
    requestAnimationFrame(() => noteRef.current?.focus());
  }

  function submit(ev?: FormEvent) {
    ev?.preventDefault();
    if (!choice) return;
    if (note.trim() === "") {
      setNoteError("Write a note: why is the label different?");
      noteRef.current?.focus();
      return;
    }
    startTransition(async () => {
      settle(await postOverride(p.eveningId, { label: choice, note, version: p.version }), `Saved: ${LABEL_META[choice].name}.`);
    });
  }

  function markReviewed() {
    if (!p.canEdit || p.reviewed) return;
    startTransition(async () => settle(await postReviewed(p.eveningId, { version: p.version }), "Marked reviewed."));
  }

  function revert() {
    startTransition(async () =>
      settle(await postRevert(p.eveningId, { version: p.version, note: note.trim() || undefined }), "Reverted to the automatic label."),
    );
  }

  useReviewKeys({
    next: p.nextHref ? () => router.push(p.nextHref!) : undefined,
    previous: p.previousHref ? () => router.push(p.previousHref!) : undefined,
    label: p.canEdit ? pickLabel : undefined,
    note: p.canEdit ? () => noteRef.current?.focus() : undefined,
    reviewed: p.canEdit ? markReviewed : undefined,
    help: () => helpRef.current?.showModal(),
  });

  function noteKeys(ev: KeyboardEvent<HTMLTextAreaElement>) {
    if (ev.key === "Enter" && (ev.ctrlKey || ev.metaKey)) submit();
    if (ev.key === "Escape") {
      setChoice(null);
      noteRef.current?.blur();
    }
  }

  return (
    <section aria-labelledby="label-title" className="card space-y-4 p-5">
      <div className="flex items-start justify-between gap-3">
        <h2 id="label-title" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
          Label
        </h2>
        <button type="button" className="text-xs text-ink-muted underline-offset-2 hover:underline" onClick={() => helpRef.current?.showModal()}>
          Keys <kbd className="rounded border border-line px-1 font-mono">?</kbd>
        </button>
      </div>
      <div className="flex items-center gap-3">
        <span aria-hidden="true" className={`inline-grid size-12 place-items-center rounded-lg font-mono text-xl font-bold ${LABEL_META[p.label].swatch}`}>
          {LABEL_META[p.label].glyph}
        </span>
        <div>
          <p className="text-lg font-semibold" data-testid="current-label">
            {LABEL_META[p.label].name}
          </p>
          <p className="text-xs text-ink-muted">
            {p.source === "override" ? `set by a person · the rules said ${LABEL_META[p.autoLabel].name}` : "set by the rules"} ·{" "}
            {p.reviewed ? "reviewed" : "not yet reviewed"}
          </p>
        </div>
      </div>

      {saved ? <FormMessage tone="info">{saved}</FormMessage> : null}
      {problem ? (
        <FormMessage tone="error">
          <p>{problem.message}</p>
          {problem.newer ? (
            <p className="mt-2 flex flex-wrap items-center gap-2">
              Newer label:
              <span className={`inline-grid size-5 place-items-center rounded font-mono text-[11px] font-bold ${LABEL_META[problem.newer.label].swatch}`} aria-hidden="true">
                {LABEL_META[problem.newer.label].glyph}
              </span>
              <strong>{LABEL_META[problem.newer.label].name}</strong>
              {problem.newer.by ? <span>by {problem.newer.by}</span> : null}
              <button
                type="button"
                className="btn-quiet px-2 py-1 text-xs"
                onClick={() => {
                  setProblem(null);
                  router.refresh();
                }}
              >
                Show the newer version
              </button>
            </p>
          ) : null}
        </FormMessage>
      ) : null}

      {p.canEdit ? (
        <form onSubmit={submit} className="space-y-3" aria-describedby="override-hint">
          <fieldset>
            <legend className="mb-2 text-sm font-medium">Override the label</legend>
            <div className="grid grid-cols-2 gap-2">
              {LABEL_ORDER.map((l, i) => (
                <label
                  key={l}
                  className={`flex cursor-pointer items-center gap-2 rounded-lg border px-2.5 py-2 text-sm has-[:checked]:border-dusk-600 has-[:checked]:bg-dusk-50 has-[:disabled]:cursor-not-allowed has-[:disabled]:opacity-50 dark:has-[:checked]:border-dusk-300 dark:has-[:checked]:bg-dusk-900 ${"border-line"}`}
                >
                  <input
                    type="radio"
                    name="label"
                    value={l}
                    className="sr-only"
                    checked={choice === l}
                    disabled={l === p.label}
                    onChange={() => pickLabel(l)}
                  />
                  <span aria-hidden="true" className={`inline-grid size-5 place-items-center rounded font-mono text-[11px] font-bold ${LABEL_META[l].swatch}`}>
                    {LABEL_META[l].glyph}
                  </span>
                  <span className="flex-1">{LABEL_META[l].name}</span>
                  <kbd aria-hidden="true" className="font-mono text-[10px] text-ink-muted">
                    {i + 1}
                  </kbd>
                </label>
              ))}
            </div>
          </fieldset>
          <div className="space-y-1.5">
            <label htmlFor="override-note" className="block text-sm font-medium">
              Note <span className="font-normal text-ink-muted">(required: why)</span>
            </label>
            <textarea
              id="override-note"
              ref={noteRef}
              value={note}
              onChange={(e) => {
                setNote(e.target.value);
                if (noteError) setNoteError(null);
              }}
              onKeyDown={noteKeys}
              aria-invalid={noteError ? true : undefined}
              aria-describedby={noteError ? "override-note-error override-hint" : "override-hint"}
              className="field-input min-h-20"
              maxLength={2000}
              placeholder="e.g. front passage: TA drops 3 K at 19:30, WD turns to north"
            />
            {noteError ? (
              <p id="override-note-error" className="text-sm text-red-700 dark:text-red-300">
                {noteError}
              </p>
            ) : null}
            <p id="override-hint" className="text-xs text-ink-muted">
              Press 1-4 to choose, write why, then Ctrl+Enter to save. Everyone in the group sees the note in the history.
            </p>
          </div>
          <div className="flex flex-wrap gap-2">
            <button type="submit" className="btn-primary" disabled={pending || choice === null}>
              {pending ? "Saving…" : choice ? `Save as ${LABEL_META[choice].name}` : "Choose a label"}
            </button>
            {!p.reviewed ? (
              <button type="button" className="btn-quiet" onClick={markReviewed} disabled={pending}>
                Mark reviewed <kbd className="font-mono text-[10px] text-ink-muted">r</kbd>
              </button>
            ) : null}
            {p.canRevert && p.source === "override" ? (
              <button type="button" className="btn-quiet" onClick={revert} disabled={pending}>
                Revert to {LABEL_META[p.autoLabel].name}
              </button>
            ) : null}
          </div>
        </form>
      ) : (
        <p className="text-sm text-ink-muted">You can read this evening and its history; analysts and leads of the group change labels.</p>
      )}
      <KeyHelp dialogRef={helpRef} />
    </section>
  );
}
