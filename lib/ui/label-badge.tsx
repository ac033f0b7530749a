/*
 * The evening labels as the UI shows them: always a letter glyph with the colour, and the
 * name in words unless space forbids (then the name is the accessible label).
 */

export type LabelKey = "local" | "stagnant" | "advective" | "unclassified";

export const LABEL_META: Record<LabelKey, { glyph: string; name: string; swatch: string }> = {
  local: { glyph: "L", name: "locally driven", swatch: "bg-label-local text-white" },
  stagnant: { glyph: "S", name: "stagnant", swatch: "bg-label-stagnant text-dusk-950" },
  advective: { glyph: "A", name: "advective", swatch: "bg-label-advective text-white" },
  unclassified: { glyph: "U", name: "unclassified", swatch: "bg-label-unclassified text-white" },
};

export const LABEL_ORDER: readonly LabelKey[] = ["local", "stagnant", "advective", "unclassified"];

/** A label chip: glyph on its colour, with the name beside it unless `compact`. */
export function LabelBadge({ label, compact = false }: { label: LabelKey; compact?: boolean }) {
  const m = LABEL_META[label];
  return (
    <span className="inline-flex items-center gap-1.5 text-xs text-ink" title={compact ? m.name : undefined}>
      <span
        aria-hidden={compact ? undefined : true}
        aria-label={compact ? m.name : undefined}
        role={compact ? "img" : undefined}
        className={`inline-grid size-5 place-items-center rounded font-mono text-[11px] font-bold ${m.swatch}`}
      >
        {m.glyph}
      </span>
      {compact ? null : <span>{m.name}</span>}
    </span>
  );
}
