/** The caution every screen that shows labels carries (wording from the domain notes). */
export const LABEL_CAUTION =
  "Labels are screening aids for research data, not a safety or regulatory product. Flux and stability thresholds are site-dependent; the defaults are starting points.";

/** The caution as a short note; `className` places it. */
export function LabelCaution({ className = "" }: { className?: string }) {
  return (
    <p className={`flex gap-2 text-xs leading-relaxed text-ink-muted ${className}`}>
      <span
        aria-hidden="true"
        className="mt-px grid size-4 shrink-0 place-items-center rounded-full border border-current text-[10px] leading-none font-semibold"
      >
        i
      </span>
      <span>{LABEL_CAUTION}</span>
    </p>
  );
}
