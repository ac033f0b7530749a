"use client";

import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { scaleBand, scaleLinear } from "@visx/scale";
import { BarStack } from "@visx/shape";
import { useRef, useState } from "react";
import { LABEL_META, LABEL_ORDER, type LabelKey } from "@/lib/ui/label-badge";
import type { Counts } from "@/features/seasons/schemas";
import { saveBlob, svgText, svgToPng } from "@/features/seasons/components/download";

/** Fill colours of the labels (same values as the label palette in tailwind.config.ts). */
const FILL: Record<LabelKey, string> = {
  local: "#1f7a5c",
  stagnant: "#d08a1e",
  advective: "#2f63b8",
  unclassified: "#6b6b78",
};
const GLYPH_INK: Record<LabelKey, string> = {
  local: "#ffffff",
  stagnant: "#111222",
  advective: "#ffffff",
  unclassified: "#ffffff",
};

export type Bar = { key: string; name: string; counts: Counts };

type Datum = Counts & { key: string };

const MARGIN = { top: 56, right: 16, bottom: 40, left: 52 };

/**
 * Stacked bars of label counts, one bar per season (or month, or year and season), with the label
 * glyph on each segment tall enough for it, a legend, and downloads as SVG and PNG.
 */
export function SeasonChart({ title, bars, fileBase }: { title: string; bars: Bar[]; fileBase: string }) {
  const svgRef = useRef<SVGSVGElement>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const height = 320;
  const width = Math.max(640, MARGIN.left + MARGIN.right + bars.length * (bars.length > 12 ? 50 : 40));
  // up to two years of seasons shrink to the card; longer records scroll sideways at full size
  const fit = bars.length <= 24;
  const innerW = width - MARGIN.left - MARGIN.right;
  const innerH = height - MARGIN.top - MARGIN.bottom;
  const data: Datum[] = bars.map((b) => ({ key: b.key, ...b.counts }));
  const max = Math.max(1, ...bars.map((b) => LABEL_ORDER.reduce((s, l) => s + b.counts[l], 0)));
  const x = scaleBand<string>({ domain: bars.map((b) => b.key), range: [0, innerW], padding: 0.25 });
  const y = scaleLinear<number>({ domain: [0, max], range: [innerH, 0], nice: true });
  const color = (l: LabelKey) => FILL[l];
  const nameOf = new Map(bars.map((b) => [b.key, b.name]));

  const download = async (kind: "svg" | "png") => {
    const svg = svgRef.current;
    if (!svg) return;
    setProblem(null);
    try {
      if (kind === "svg") saveBlob(new Blob([svgText(svg)], { type: "image/svg+xml" }), `${fileBase}.svg`);
      else saveBlob(await svgToPng(svg), `${fileBase}.png`);
    } catch (err) {
      setProblem(err instanceof Error ? err.message : "The download failed.");
    }
  };

  return (
    <figure className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <figcaption className="text-sm font-semibold text-ink">{title}</figcaption>
        <div className="flex gap-2">
          <button
            type="button"
            className="btn-quiet px-2.5 py-1 text-xs"
            onClick={() => void download("svg")}
          >
            Chart as SVG
          </button>
          <button
            type="button"
            className="btn-quiet px-2.5 py-1 text-xs"
            onClick={() => void download("png")}
          >
            Chart as PNG
          </button>
        </div>
      </div>
      {problem ? (
        <p role="alert" className="text-sm text-red-700 dark:text-red-300">
          {problem}
        </p>
      ) : null}
      <div className="overflow-x-auto rounded-lg border border-line bg-white p-2">
        <svg
          ref={svgRef}
          width={width}
          height={height}
          viewBox={`0 0 ${width} ${height}`}
          style={fit ? { maxWidth: "100%", height: "auto" } : undefined}
          role="img"
          aria-label={title}
          fontFamily="Inter, system-ui, sans-serif"
        >
          <rect width={width} height={height} fill="#ffffff" />
          <text x={MARGIN.left} y={16} fontSize={13} fontWeight={600} fill="#171827">
            {title}
          </text>
          <Group left={MARGIN.left} top={26}>
            {LABEL_ORDER.map((l, i) => (
              <g key={l} transform={`translate(${i * 104}, 0)`}>
                <rect width={14} height={14} rx={2} fill={FILL[l]} />
                <text x={7} y={11} fontSize={9} fontWeight={700} textAnchor="middle" fill={GLYPH_INK[l]}>
                  {LABEL_META[l].glyph}
                </text>
                <text x={19} y={11} fontSize={11} fill="#4b4f6b">
                  {LABEL_META[l].name}
                </text>
              </g>
            ))}
          </Group>
          <Group left={MARGIN.left} top={MARGIN.top}>
            {y.ticks(5).map((t) => (
              <line key={t} x1={0} x2={innerW} y1={y(t)} y2={y(t)} stroke="#e6e8f2" />
            ))}
            <BarStack<Datum, LabelKey>
              data={data}
              keys={[...LABEL_ORDER]}
              x={(d) => d.key}
              xScale={x}
              yScale={y}
              color={color}
            >
              {(stacks) =>
                stacks.map((stack) =>
                  stack.bars.map((bar) => (
                    <g key={`${stack.key}-${bar.index}`}>
                      <rect
                        x={bar.x}
                        y={bar.y}
                        width={bar.width}
                        height={Math.max(0, bar.height)}
                        fill={bar.color}
                      >
                        <title>{`${nameOf.get(bar.bar.data.key) ?? ""}: ${bar.bar.data[stack.key]} ${LABEL_META[stack.key].name}`}</title>
                      </rect>
                      {bar.height >= 14 && bar.width >= 12 ? (
                        <text
                          x={bar.x + bar.width / 2}
                          y={bar.y + bar.height / 2 + 4}
                          fontSize={10}
                          fontWeight={700}
                          textAnchor="middle"
                          fill={GLYPH_INK[stack.key]}
                        >
                          {LABEL_META[stack.key].glyph}
                        </text>
                      ) : null}
                    </g>
                  )),
                )
              }
            </BarStack>
            <AxisLeft
              scale={y}
              numTicks={5}
              stroke="#9aa0bf"
              tickStroke="#9aa0bf"
              tickLabelProps={{ fill: "#4b4f6b", fontSize: 11 }}
              label="evenings"
              labelProps={{ fill: "#4b4f6b", fontSize: 11 }}
            />
            <AxisBottom
              top={innerH}
              scale={x}
              stroke="#9aa0bf"
              tickStroke="#9aa0bf"
              tickFormat={(k) => nameOf.get(k) ?? k}
              tickLabelProps={() => ({
                fill: "#4b4f6b",
                fontSize: bars.length > 12 ? 10 : 11,
                textAnchor: "middle" as const,
              })}
            />
          </Group>
        </svg>
      </div>
    </figure>
  );
}
