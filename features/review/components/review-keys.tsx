"use client";

import { useEffect, useRef, type RefObject } from "react";
import type { Label } from "@/features/review/schemas";

/** Keys that set a label: digits in label order, or the label's first letter. */
export const LABEL_KEYS: Record<string, Label> = {
  "1": "local",
  "2": "stagnant",
  "3": "advective",
  "4": "unclassified",
  l: "local",
  s: "stagnant",
  a: "advective",
  u: "unclassified",
};

export type ReviewKeyHandlers = {
  next?: () => void;
  previous?: () => void;
  label?: (label: Label) => void;
  note?: () => void;
  reviewed?: () => void;
  open?: () => void;
  help: () => void;
};

function typing(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  return target.isContentEditable || ["INPUT", "TEXTAREA", "SELECT"].includes(target.tagName);
}

/**
 * Single-key review controls on the whole page: j/k (or ↓/↑) next and previous, 1-4 or
 * l/s/a/u set a label, n the note, r reviewed, Enter open, ? help. Ignored while typing in a
 * field or with Ctrl/Alt/Meta held, so the browser's own shortcuts keep working.
 */
export function useReviewKeys(handlers: ReviewKeyHandlers, opts: { arrows?: boolean } = {}) {
  const ref = useRef(handlers);
  useEffect(() => {
    ref.current = handlers;
  });
  useEffect(() => {
    function onKey(ev: KeyboardEvent) {
      if (ev.defaultPrevented || ev.ctrlKey || ev.metaKey || ev.altKey || typing(ev.target)) return;
      if (document.querySelector("dialog[open]")) return;
      const h = ref.current;
      const key = ev.key.length === 1 ? ev.key.toLowerCase() : ev.key;
      let done = true;
      if (key === "j" || (opts.arrows && key === "ArrowDown")) h.next?.();
      else if (key === "k" || (opts.arrows && key === "ArrowUp")) h.previous?.();
      else if (key in LABEL_KEYS && h.label) h.label(LABEL_KEYS[key]!);
      else if (key === "n" && h.note) h.note();
      else if (key === "r" && h.reviewed) h.reviewed();
      else if (key === "Enter" && h.open && (ev.target === document.body || ev.target === null)) h.open();
      else if (key === "?") h.help();
      else done = false;
      if (done) ev.preventDefault();
    }
    document.addEventListener("keydown", onKey);
    return () => document.removeEventListener("keydown", onKey);
  }, [opts.arrows]);
}

const KEYS: Array<[string, string]> = [
  ["j  or  ↓", "next evening"],
  ["k  or  ↑", "previous evening"],
  ["1  or  l", "set locally driven"],
  ["2  or  s", "set stagnant"],
  ["3  or  a", "set advective"],
  ["4  or  u", "set unclassified"],
  ["n", "write the note"],
  ["Ctrl + Enter", "save the override (in the note)"],
  ["r", "mark reviewed"],
  ["Enter", "open the evening (queue)"],
  ["?", "this help"],
  ["Esc", "close"],
];

/** The help overlay listing the review keys (a modal dialog; Esc closes it). */
export function KeyHelp({ dialogRef }: { dialogRef: RefObject<HTMLDialogElement | null> }) {
  return (
    <dialog
      ref={dialogRef}
      aria-labelledby="key-help-title"
      className="m-auto w-[min(28rem,calc(100vw-2rem))] rounded-xl border border-line bg-surface-raised p-0 text-ink shadow-xl backdrop:bg-black/40"
    >
      <div className="space-y-4 p-5">
        <h2 id="key-help-title" className="text-lg font-semibold">
          Review keys
        </h2>
        <dl className="grid grid-cols-[9rem_1fr] gap-x-4 gap-y-1.5 text-sm">
          {KEYS.map(([k, what]) => (
            <div key={k} className="contents">
              <dt>
                <kbd className="rounded border border-line bg-surface-sunken px-1.5 py-0.5 font-mono text-xs whitespace-pre">{k}</kbd>
              </dt>
              <dd className="text-ink-muted">{what}</dd>
            </div>
          ))}
        </dl>
        <p className="text-xs text-ink-muted">Keys do nothing while you type in a field. Arrow keys on the charts move the read-out.</p>
        <form method="dialog" className="flex justify-end">
          <button className="btn-primary" autoFocus>
            Close
          </button>
        </form>
      </div>
    </dialog>
  );
}
