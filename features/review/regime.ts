/*
 * The stable-regime view: sigma_w against wind speed per evening. Turbulence stays weak below
 * a threshold speed and grows with speed above it (the "hockey stick" of Sun et al. 2012,
 * J. Atmos. Sci. 69). A continuous two-segment (hinge) least-squares fit estimates that speed.
 */

export type XY = { x: number; y: number };

export type HingeFit = {
  /** breakpoint, same unit as x (m/s) */
  breakX: number;
  /** y = intercept + slopeBelow * x + slopeChange * max(0, x - breakX) */
  intercept: number;
  slopeBelow: number;
  slopeAbove: number;
  sse: number;
  n: number;
};

function solve3(a: number[][], b: number[]): [number, number, number] | null {
  // Cramer's rule is enough for a 3x3 normal-equation system.
  const det = (m: number[][]) =>
    m[0]![0]! * (m[1]![1]! * m[2]![2]! - m[1]![2]! * m[2]![1]!) -
    m[0]![1]! * (m[1]![0]! * m[2]![2]! - m[1]![2]! * m[2]![0]!) +
    m[0]![2]! * (m[1]![0]! * m[2]![1]! - m[1]![1]! * m[2]![0]!);
  const d = det(a);
  if (!Number.isFinite(d) || Math.abs(d) < 1e-12) return null;
  const col = (k: number) => a.map((row, i) => row.map((v, j) => (j === k ? b[i]! : v)));
  return [det(col(0)) / d, det(col(1)) / d, det(col(2)) / d];
}

/**
 * Fits y = c0 + c1 x + c2 max(0, x - b) for candidate breakpoints b between the 10th and 90th
 * percentile of x and keeps the one with the least squared error. Null with fewer than 12 points
 * or when the fit finds no steepening (the slope above must exceed the slope below).
 */
export function fitHinge(points: XY[], steps = 60): HingeFit | null {
  const pts = points.filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y));
  if (pts.length < 12) return null;
  const xs = pts.map((p) => p.x).sort((a, b) => a - b);
  const lo = xs[Math.floor(xs.length * 0.1)]!;
  const hi = xs[Math.floor(xs.length * 0.9)]!;
  if (!(hi > lo)) return null;
  let best: HingeFit | null = null;
  for (let s = 0; s <= steps; s++) {
    const b = lo + ((hi - lo) * s) / steps;
    const m = [
      [0, 0, 0],
      [0, 0, 0],
      [0, 0, 0],
    ];
    const r = [0, 0, 0];
    for (const p of pts) {
      const f = [1, p.x, Math.max(0, p.x - b)];
      for (let i = 0; i < 3; i++) {
        r[i]! += f[i]! * p.y;
        for (let j = 0; j < 3; j++) m[i]![j]! += f[i]! * f[j]!;
      }
    }
    const c = solve3(m, r);
    if (!c) continue;
    let sse = 0;
    for (const p of pts) {
      const e = p.y - (c[0] + c[1] * p.x + c[2] * Math.max(0, p.x - b));
      sse += e * e;
    }
    if (!best || sse < best.sse) {
      best = { breakX: b, intercept: c[0], slopeBelow: c[1], slopeAbove: c[1] + c[2], sse, n: pts.length };
    }
  }
  if (!best || !(best.slopeAbove > best.slopeBelow)) return null;
  return best;
}

/** Median of y in bins of x of width `binWidth` (bins with fewer than `minCount` points left out). */
export function binnedMedians(points: XY[], binWidth: number, minCount = 3): XY[] {
  const bins = new Map<number, number[]>();
  for (const p of points) {
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) continue;
    const k = Math.floor(p.x / binWidth);
    const list = bins.get(k);
    if (list) list.push(p.y);
    else bins.set(k, [p.y]);
  }
  return [...bins.entries()]
    .filter(([, ys]) => ys.length >= minCount)
    .sort((a, b) => a[0] - b[0])
    .map(([k, ys]) => {
      ys.sort((a, b) => a - b);
      const mid = ys.length >> 1;
      const median = ys.length % 2 ? ys[mid]! : (ys[mid - 1]! + ys[mid]!) / 2;
      return { x: (k + 0.5) * binWidth, y: median };
    });
}
