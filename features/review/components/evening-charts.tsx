"use client";

import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { scaleLinear } from "@visx/scale";
import { LinePath } from "@visx/shape";
import { useEffect, useId, useMemo, useRef, useState, type KeyboardEvent, type MouseEvent } from "react";
import type { EveningSeries, SeriesColumn, WindowSpan } from "@/features/review/schemas";
import { ANOMALY_GLYPH, WEAK_GLYPH, kindWords } from "@/features/review/flags";
import type { AnomalyKind } from "@/lib/anomalies/detect";

/*
 * Small multiples of the evening window (4 h either side of sunset) sharing one time axis and
 * one cursor: hover, or focus the figure and use the arrow keys, to read every series at a time.
 */

const HOUR_MS = 3_600_000;
const MARGIN = { top: 6, right: 14, bottom: 4, left: 44 };
const CHART_H = 96;
const AXIS_H = 26;

const WINDOW_FILL: Record<WindowSpan["name"], string> = {
  afternoon: "fill-amber-300/25 dark:fill-amber-300/10",
  transition: "fill-dusk-300/30 dark:fill-dusk-400/20",
  evening: "fill-dusk-600/20 dark:fill-dusk-300/15",
};

function useWidth(fallback: number) {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(fallback);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const ro = new ResizeObserver(([entry]) => {
      if (entry) setWidth(Math.max(280, Math.floor(entry.contentRect.width)));
    });
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  return { ref, width };
}

function fmt(v: number | null | undefined, unit = ""): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const a = Math.abs(v);
  const s = a >= 100 ? v.toFixed(0) : a >= 10 ? v.toFixed(1) : a >= 1 ? v.toFixed(2) : v.toPrecision(2);
  return unit && unit !== "1" ? `${s} ${unit}` : s;
}

function clock(ms: number, offsetHours: number): string {
  return new Date(ms + offsetHours * HOUR_MS).toISOString().slice(11, 16);
}

function yDomain(col: SeriesColumn): [number, number] {
  if (col.circular) return [0, 360];
  const vals = col.values.filter((v): v is number => v !== null);
  if (vals.length === 0) return [0, 1];
  let lo = Math.min(...vals);
  let hi = Math.max(...vals);
  if (col.key === "ZL") {
    // z/L runs to large values in calm nights; the sign and the first unit matter most.
    lo = Math.max(lo, -5);
    hi = Math.min(hi, 5);
  }
  if (["H", "ZL", "LE", "FC"].includes(col.key)) {
    lo = Math.min(lo, 0);
    hi = Math.max(hi, 0);
  }
  if (["W_SIGMA", "USTAR", "WS"].includes(col.key)) lo = Math.min(lo, 0);
  if (hi - lo < 1e-9) {
    hi += 0.5;
    lo -= 0.5;
  }
  const pad = (hi - lo) * 0.08;
  return [lo - (lo === 0 ? 0 : pad), hi + pad];
}

/** An anomaly drawn over its series: from the start of its first to the end of its last period. */
export type ChartAnomaly = {
  series: string;
  kind: AnomalyKind;
  startMs: number;
  endMs: number;
  peakScore: number;
};

/** The night's weak-turbulence flag: the u* threshold and the first and last weak period starts. */
export type ChartWeakTurbulence = {
  fluxSeries: string;
  thresholdMs: number;
  weakPeriods: number;
  nightPeriods: number;
  firstWeakMs: number | null;
  lastWeakMs: number | null;
};

/** Diagonal hatching for anomaly spans: a texture as well as a tint, so colour is not the only cue. */
function Hatch({ id }: { id: string }) {
  return (
    <defs>
      <pattern id={id} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
        <rect width="6" height="6" className="fill-red-500/10 dark:fill-red-400/10" />
        <line
          x1="0"
          x2="0"
          y1="0"
          y2="6"
          className="stroke-red-700/60 dark:stroke-red-300/60"
          strokeWidth="2"
        />
      </pattern>
    </defs>
  );
}

type Props = {
  series: EveningSeries;
  windows: WindowSpan[];
  centreMs: number;
  sunsetMs: number | null;
  duskMs: number | null;
  utcOffsetHours: number;
  anomalies?: ChartAnomaly[];
  weak?: ChartWeakTurbulence | null;
};

const matches = (col: SeriesColumn, series: string) => col.key === series || col.name === series;

export function EveningCharts({
  series,
  windows,
  centreMs,
  sunsetMs,
  duskMs,
  utcOffsetHours,
  anomalies = [],
  weak = null,
}: Props) {
  const hatchId = `hatch-${useId().replace(/:/g, "")}`;
  const { ref, width } = useWidth(720);
  const [cursor, setCursor] = useState<number | null>(null);
  const readoutId = useId();
  const x0 = centreMs - 4 * HOUR_MS;
  const x1 = centreMs + 4 * HOUR_MS;
  const innerW = width - MARGIN.left - MARGIN.right;
  const x = useMemo(() => scaleLinear<number>({ domain: [x0, x1], range: [0, innerW] }), [x0, x1, innerW]);
  const n = series.timeMs.length;
  const ticks = useMemo(() => {
    const out: number[] = [];
    const first = Math.ceil((x0 + utcOffsetHours * HOUR_MS) / HOUR_MS) * HOUR_MS - utcOffsetHours * HOUR_MS;
    for (let t = first; t <= x1; t += HOUR_MS) out.push(t);
    return out;
  }, [x0, x1, utcOffsetHours]);

  function pick(ev: MouseEvent<SVGRectElement>) {
    if (n === 0) return;
    const rect = ev.currentTarget.getBoundingClientRect();
    const t = x.invert(ev.clientX - rect.left);
    let best = 0;
    for (let i = 1; i < n; i++)
      if (Math.abs(series.timeMs[i]! - t) < Math.abs(series.timeMs[best]! - t)) best = i;
    setCursor(best);
  }

  function onKey(ev: KeyboardEvent<HTMLDivElement>) {
    if (n === 0) return;
    if (ev.key === "ArrowRight" || ev.key === "ArrowLeft") {
      ev.preventDefault();
      ev.stopPropagation();
      const step = ev.key === "ArrowRight" ? 1 : -1;
      setCursor((c) => Math.min(n - 1, Math.max(0, (c ?? (step > 0 ? -1 : n)) + step)));
    } else if (ev.key === "Escape") {
      setCursor(null);
    }
  }

  const cursorMs = cursor === null ? null : series.timeMs[cursor]!;
  const ustarCol = series.columns.find((c) => c.key === "USTAR");
  // A flux period is weak when u* is under the night's threshold, between the first and last weak
  // period the screen found (so daytime periods never count).
  const weakAt = (i: number): boolean => {
    if (!weak || weak.firstWeakMs === null || weak.lastWeakMs === null) return false;
    const t = series.timeMs[i]!;
    const half = (series.periodMinutes * 60_000) / 2;
    const u = ustarCol?.values[i];
    return (
      t - half >= weak.firstWeakMs &&
      t - half <= weak.lastWeakMs &&
      u !== null &&
      u !== undefined &&
      u < weak.thresholdMs
    );
  };
  const anomaliesAt = (col: SeriesColumn, ms: number) =>
    anomalies.filter((a) => matches(col, a.series) && ms >= a.startMs && ms <= a.endMs);
  const markers = [
    sunsetMs !== null ? { ms: sunsetMs, label: "sunset", dash: undefined } : null,
    duskMs !== null ? { ms: duskMs, label: "civil dusk", dash: "4 3" } : null,
  ].filter((m) => m !== null);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-ink-muted">
        {windows.map((w) => (
          <span key={w.name} className="inline-flex items-center gap-1.5">
            <svg aria-hidden="true" width="14" height="10">
              <rect width="14" height="10" rx="2" className={WINDOW_FILL[w.name]} />
            </svg>
            {w.name} window
          </span>
        ))}
        <span className="inline-flex items-center gap-1.5">
          <svg aria-hidden="true" width="14" height="10">
            <line x1="7" x2="7" y1="0" y2="10" className="stroke-ink" strokeWidth="1.5" />
          </svg>
          sunset
        </span>
        <span className="inline-flex items-center gap-1.5">
          <svg aria-hidden="true" width="14" height="10">
            <line
              x1="7"
              x2="7"
              y1="0"
              y2="10"
              className="stroke-ink"
              strokeWidth="1.5"
              strokeDasharray="3 2"
            />
          </svg>
          civil dusk
        </span>
        {anomalies.length ? (
          <span className="inline-flex items-center gap-1.5">
            <svg aria-hidden="true" width="14" height="10">
              <Hatch id={`${hatchId}-legend`} />
              <rect
                width="14"
                height="10"
                rx="2"
                fill={`url(#${hatchId}-legend)`}
                className="stroke-ink"
                strokeWidth="0.75"
              />
            </svg>
            <span aria-hidden="true">{ANOMALY_GLYPH}</span> anomaly
          </span>
        ) : null}
        {weak ? (
          <span className="inline-flex items-center gap-1.5">
            <svg aria-hidden="true" width="14" height="10">
              <path d="M7 1 L13 9 L1 9 Z" className="fill-surface-raised stroke-ink" strokeWidth="1.25" />
            </svg>
            <span aria-hidden="true">{WEAK_GLYPH}</span> weak turbulence (u* under{" "}
            {weak.thresholdMs.toFixed(2)} m/s, dashed on u*)
          </span>
        ) : null}
        <span>
          times: data clock (UTC{utcOffsetHours >= 0 ? "+" : "−"}
          {Math.abs(utcOffsetHours)})
        </span>
      </div>

      <div
        ref={ref}
        tabIndex={0}
        role="group"
        aria-label="Charts of the evening window. Use the left and right arrow keys to read the values at each half-hour."
        aria-describedby={readoutId}
        onKeyDown={onKey}
        className="rounded-lg"
      >
        {n === 0 ? (
          <p className="rounded-lg border border-dashed border-line p-6 text-center text-sm text-ink-muted">
            No half-hourly data stored for this window.
          </p>
        ) : null}
        {series.columns.map((col, ci) => {
          const last = ci === series.columns.length - 1;
          const h = CHART_H + (last ? AXIS_H : 0);
          const innerH = CHART_H - MARGIN.top - MARGIN.bottom;
          const y = scaleLinear<number>({
            domain: yDomain(col),
            range: [innerH, 0],
            clamp: col.key === "ZL",
          });
          const pts = col.values.map((v, i) => ({ t: series.timeMs[i]!, v }));
          const hasData = col.values.some((v) => v !== null);
          const zeroVisible = y.domain()[0]! < 0 && y.domain()[1]! > 0;
          const spans = anomalies.filter((a) => matches(col, a.series));
          const isFlux = weak !== null && matches(col, weak.fluxSeries);
          const thresholdLine = weak !== null && col.key === "USTAR" ? weak.thresholdMs : null;
          const flagText = [
            ...spans.map(
              (a) =>
                `${ANOMALY_GLYPH} ${kindWords(a.kind)} ${clock(a.startMs, utcOffsetHours)}–${clock(a.endMs, utcOffsetHours)}`,
            ),
            isFlux && weak
              ? `${WEAK_GLYPH} ${weak.weakPeriods} of ${weak.nightPeriods} night half-hours under weak turbulence`
              : null,
          ].filter((t) => t !== null);
          return (
            <svg
              key={col.key}
              viewBox={`0 0 ${width} ${h}`}
              role="img"
              aria-label={`${col.name} (${col.unit}) over the evening window${flagText.length ? `; ${flagText.join("; ")}` : ""}${
                thresholdLine !== null ? `; u* threshold ${thresholdLine.toFixed(2)} m/s` : ""
              }`}
              className="block h-auto w-full text-ink"
            >
              {spans.length ? <Hatch id={`${hatchId}-${ci}`} /> : null}
              <Group left={MARGIN.left} top={MARGIN.top}>
                {windows.map((w) => (
                  <rect
                    key={w.name}
                    x={x(w.startMs)}
                    width={Math.max(0, x(w.endMs) - x(w.startMs))}
                    y={0}
                    height={innerH}
                    className={WINDOW_FILL[w.name]}
                  />
                ))}
                {ticks.map((t) => (
                  <line
                    key={t}
                    x1={x(t)}
                    x2={x(t)}
                    y1={0}
                    y2={innerH}
                    className="stroke-line"
                    strokeWidth={1}
                  />
                ))}
                {spans.map((a, ai) => {
                  const from = Math.max(0, x(a.startMs));
                  const to = Math.min(innerW, x(a.endMs));
                  if (!(to > from)) return null;
                  return (
                    <g key={`${a.kind}-${a.startMs}`}>
                      <rect
                        x={from}
                        width={to - from}
                        y={0}
                        height={innerH}
                        fill={`url(#${hatchId}-${ci})`}
                      />
                      <text
                        x={from + 3}
                        y={innerH - 4 - ai * 11}
                        className="fill-ink text-[10px] font-semibold"
                      >
                        {ANOMALY_GLYPH} {kindWords(a.kind)}
                      </text>
                    </g>
                  );
                })}
                {thresholdLine !== null &&
                thresholdLine >= y.domain()[0]! &&
                thresholdLine <= y.domain()[1]! ? (
                  <g>
                    <line
                      x1={0}
                      x2={innerW}
                      y1={y(thresholdLine)}
                      y2={y(thresholdLine)}
                      className="stroke-ink"
                      strokeWidth={1}
                      strokeDasharray="6 3"
                    />
                    <text
                      x={innerW - 2}
                      y={y(thresholdLine) - 3}
                      textAnchor="end"
                      className="fill-ink-muted text-[10px]"
                    >
                      u* threshold {thresholdLine.toFixed(2)}
                    </text>
                  </g>
                ) : null}
                {zeroVisible ? (
                  <line
                    x1={0}
                    x2={innerW}
                    y1={y(0)}
                    y2={y(0)}
                    className="stroke-ink-muted"
                    strokeWidth={0.75}
                    strokeDasharray="2 2"
                  />
                ) : null}
                {markers.map((m) => (
                  <g key={m.label}>
                    <line
                      x1={x(m.ms)}
                      x2={x(m.ms)}
                      y1={0}
                      y2={innerH}
                      className="stroke-ink"
                      strokeWidth={1.5}
                      strokeDasharray={m.dash}
                    />
                    {ci === 0 ? (
                      <text x={x(m.ms) + 4} y={10} className="fill-ink-muted text-[10px]">
                        {m.label}
                      </text>
                    ) : null}
                  </g>
                ))}
                {col.circular ? null : (
                  <LinePath
                    data={pts}
                    x={(d) => x(d.t)}
                    y={(d) => y(d.v ?? 0)}
                    defined={(d) => d.v !== null}
                    className="stroke-dusk-600 dark:stroke-dusk-300"
                    strokeWidth={1.75}
                    fill="none"
                  />
                )}
                {pts.map((d, i) =>
                  d.v === null ? null : isFlux && weakAt(i) ? (
                    // weak-turbulence periods of the flux: a triangle, so the shape says it, not the colour
                    <path
                      key={i}
                      d={`M${x(d.t)} ${y(d.v) - 4.5} L${x(d.t) + 4} ${y(d.v) + 3} L${x(d.t) - 4} ${y(d.v) + 3} Z`}
                      className="fill-surface-raised stroke-red-700 dark:stroke-red-300"
                      strokeWidth={1.5}
                    />
                  ) : (
                    <circle
                      key={i}
                      cx={x(d.t)}
                      cy={y(d.v)}
                      r={col.circular ? 3 : 2}
                      className={
                        col.circular
                          ? "fill-dusk-600 dark:fill-dusk-300"
                          : "fill-surface-raised stroke-dusk-600 dark:stroke-dusk-300"
                      }
                      strokeWidth={1.25}
                    />
                  ),
                )}
                {!hasData ? (
                  <text
                    x={innerW / 2}
                    y={innerH / 2}
                    textAnchor="middle"
                    className="fill-ink-muted text-[11px]"
                  >
                    no data in this window
                  </text>
                ) : null}
                {cursorMs !== null ? (
                  <line
                    x1={x(cursorMs)}
                    x2={x(cursorMs)}
                    y1={0}
                    y2={innerH}
                    className="stroke-red-600 dark:stroke-red-400"
                    strokeWidth={1}
                  />
                ) : null}
                <AxisLeft
                  scale={y}
                  numTicks={3}
                  tickValues={col.circular ? [0, 90, 180, 270, 360] : undefined}
                  tickFormat={(v) =>
                    col.circular
                      ? (["N", "E", "S", "W", "N"][Number(v) / 90] ?? String(v))
                      : y.tickFormat(3)(Number(v))
                  }
                  stroke="currentColor"
                  tickStroke="currentColor"
                  tickLength={3}
                  tickLabelProps={{
                    className: "fill-ink-muted text-[10px]",
                    textAnchor: "end",
                    dx: -2,
                    dy: 3,
                  }}
                  strokeWidth={0.5}
                />
                <text
                  x={6}
                  y={3}
                  dominantBaseline="hanging"
                  className="fill-ink stroke-surface-raised text-[10px] font-semibold"
                  strokeWidth={3}
                  paintOrder="stroke"
                >
                  {col.name}
                  {col.unit === "1" ? (
                    ""
                  ) : (
                    <tspan className="fill-ink-muted font-normal"> · {col.unit}</tspan>
                  )}
                </text>
                {last ? (
                  <AxisBottom
                    top={innerH}
                    scale={x}
                    tickValues={ticks}
                    tickFormat={(v) => clock(Number(v), utcOffsetHours)}
                    stroke="currentColor"
                    tickStroke="currentColor"
                    tickLength={3}
                    strokeWidth={0.5}
                    tickLabelProps={{ className: "fill-ink-muted text-[10px]", textAnchor: "middle" }}
                  />
                ) : null}
                <rect
                  width={innerW}
                  height={innerH}
                  fill="transparent"
                  onMouseMove={pick}
                  onMouseLeave={() => setCursor(null)}
                />
              </Group>
            </svg>
          );
        })}
      </div>

      <div
        id={readoutId}
        aria-live="polite"
        className="min-h-16 rounded-lg border border-line bg-surface-sunken px-3 py-2 text-xs"
      >
        {cursor === null ? (
          <span className="text-ink-muted">
            Point at a chart, or focus the charts and use ← →, to read the values of one half-hour.
          </span>
        ) : (
          <>
            <span className="mr-3 font-semibold">
              {clock(cursorMs!, utcOffsetHours)} ({fmt((cursorMs! - centreMs) / HOUR_MS)} h from sunset)
            </span>
            <span className="inline-flex flex-wrap gap-x-4 gap-y-1">
              {series.columns.map((c) => (
                <span key={c.key}>
                  <span className="text-ink-muted">{c.name}</span>{" "}
                  <span className="font-mono">{fmt(c.values[cursor], c.unit)}</span>
                  {anomaliesAt(c, cursorMs!).map((a) => (
                    <span key={a.startMs}>
                      {" "}
                      {ANOMALY_GLYPH} {kindWords(a.kind)}
                    </span>
                  ))}
                  {weak && matches(c, weak.fluxSeries) && weakAt(cursor) ? (
                    <span> {WEAK_GLYPH} weak turbulence</span>
                  ) : null}
                </span>
              ))}
            </span>
          </>
        )}
      </div>
    </div>
  );
}
