"use client";

import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { scaleLinear } from "@visx/scale";
import { LinePath } from "@visx/shape";
import { useEffect, useMemo, useRef, useState } from "react";
import { LABEL_META, LABEL_ORDER } from "@/lib/ui/label-badge";
import type { Label, RegimePoint } from "@/features/review/schemas";
import { binnedMedians, fitHinge } from "@/features/review/regime";

const M = { top: 16, right: 20, bottom: 44, left: 56 };
const H = 420;

// Colour and shape both carry the label.
const FILL: Record<Label, string> = {
  local: "fill-label-local stroke-label-local",
  stagnant: "fill-label-stagnant stroke-label-stagnant",
  advective: "fill-label-advective stroke-label-advective",
  unclassified: "fill-label-unclassified stroke-label-unclassified",
};

function Shape({ label, x, y, r = 3.5 }: { label: Label; x: number; y: number; r?: number }) {
  const cls = `${FILL[label]} fill-opacity-60`;
  switch (label) {
    case "local":
      return <circle cx={x} cy={y} r={r} className={cls} strokeWidth={1} />;
    case "stagnant":
      return <rect x={x - r} y={y - r} width={2 * r} height={2 * r} className={cls} strokeWidth={1} />;
    case "advective":
      return <path d={`M${x},${y - r * 1.2}L${x + r * 1.1},${y + r * 0.8}L${x - r * 1.1},${y + r * 0.8}Z`} className={cls} strokeWidth={1} />;
    default:
      return <path d={`M${x - r},${y - r}L${x + r},${y + r}M${x - r},${y + r}L${x + r},${y - r}`} className={FILL[label]} strokeWidth={1.5} fill="none" />;
  }
}

/** sigma_w against wind speed for every evening, coloured and shaped by label, with a hinge fit. */
export function RegimeChart({ points }: { points: RegimePoint[] }) {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(720);
  const [shown, setShown] = useState<Label[]>([...LABEL_ORDER]);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const ro = new ResizeObserver(([e]) => e && setWidth(Math.max(300, Math.floor(e.contentRect.width))));
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  const xy = useMemo(() => points.map((p) => ({ x: p.ws, y: p.sigmaW })), [points]);
  const fit = useMemo(() => fitHinge(xy), [xy]);
  const medians = useMemo(() => binnedMedians(xy, 0.25), [xy]);
  const innerW = width - M.left - M.right;
  const innerH = H - M.top - M.bottom;
  const xMax = Math.max(1, ...points.map((p) => p.ws)) * 1.05;
  const yMax = Math.max(0.1, ...points.map((p) => p.sigmaW)) * 1.05;
  const x = scaleLinear<number>({ domain: [0, xMax], range: [0, innerW] });
  const y = scaleLinear<number>({ domain: [0, yMax], range: [innerH, 0] });
  const counts = Object.fromEntries(LABEL_ORDER.map((l) => [l, points.filter((p) => p.label === l).length])) as Record<Label, number>;

  return (
    <div className="space-y-4">
      <fieldset className="flex flex-wrap gap-x-5 gap-y-2 text-sm">
        <legend className="sr-only">Show labels</legend>
        {LABEL_ORDER.map((l) => (
          <label key={l} className="inline-flex cursor-pointer items-center gap-2">
            <input
              type="checkbox"
              className="size-4 accent-dusk-600"
              checked={shown.includes(l)}
              onChange={() => setShown((s) => (s.includes(l) ? s.filter((v) => v !== l) : [...s, l]))}
            />
            <svg width="14" height="14" aria-hidden="true">
              <Shape label={l} x={7} y={7} r={4.5} />
            </svg>
            {LABEL_META[l].name} <span className="font-mono text-xs text-ink-muted">{counts[l]}</span>
          </label>
        ))}
      </fieldset>
      <div ref={ref}>
        <svg width={width} height={H} role="img" aria-label={`σw against wind speed in the evening window for ${points.length} evenings`} className="text-ink">
          <Group left={M.left} top={M.top}>
            {y.ticks(5).map((t) => (
              <line key={t} x1={0} x2={innerW} y1={y(t)} y2={y(t)} className="stroke-line" />
            ))}
            {fit ? (
              <>
                <line x1={x(fit.breakX)} x2={x(fit.breakX)} y1={0} y2={innerH} className="stroke-ink" strokeDasharray="5 4" />
                <text x={x(fit.breakX) + 6} y={12} className="fill-ink text-[11px]">
                  hinge ≈ {fit.breakX.toFixed(1)} m/s
                </text>
              </>
            ) : null}
            {points
              .filter((p) => shown.includes(p.label))
              .map((p) => (
                <Shape key={p.id} label={p.label} x={x(p.ws)} y={y(p.sigmaW)} />
              ))}
            <LinePath data={medians} x={(d) => x(d.x)} y={(d) => y(d.y)} className="stroke-ink" strokeWidth={2} fill="none" />
            {fit ? (
              <LinePath
                data={[0, fit.breakX, xMax].map((v) => ({ x: v, y: fit.intercept + fit.slopeBelow * v + (fit.slopeAbove - fit.slopeBelow) * Math.max(0, v - fit.breakX) }))}
                x={(d) => x(d.x)}
                y={(d) => y(Math.max(0, d.y))}
                className="stroke-red-700 dark:stroke-red-400"
                strokeWidth={1.5}
                strokeDasharray="2 3"
                fill="none"
              />
            ) : null}
            <AxisLeft scale={y} numTicks={5} stroke="currentColor" tickStroke="currentColor" tickLabelProps={{ className: "fill-ink-muted text-[11px]", textAnchor: "end", dx: -3, dy: 3 }} />
            <AxisBottom top={innerH} scale={x} numTicks={8} stroke="currentColor" tickStroke="currentColor" tickLabelProps={{ className: "fill-ink-muted text-[11px]", textAnchor: "middle" }} />
            <text x={innerW / 2} y={innerH + 36} textAnchor="middle" className="fill-ink text-[12px]">
              wind speed, evening window (m/s)
            </text>
            <text transform={`translate(${-42}, ${innerH / 2}) rotate(-90)`} textAnchor="middle" className="fill-ink text-[12px]">
              σw, evening window (m/s)
            </text>
          </Group>
        </svg>
      </div>
      <p className="text-sm text-ink-muted">
        Solid line: median σw per 0.25 m/s of wind speed. Dotted: a two-segment least-squares fit; its hinge estimates the
        wind speed below which turbulence collapses at this site
        {fit ? ` (here about ${fit.breakX.toFixed(1)} m/s, slope ${fit.slopeBelow.toFixed(3)} below and ${fit.slopeAbove.toFixed(3)} above)` : " (too few evenings, or no steepening, for a fit)"}
        . A screening aid: the threshold depends on the site and the measurement height.
      </p>
    </div>
  );
}
