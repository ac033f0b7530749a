/**
 * "Weak turbulence" flags: nighttime flux periods whose u* is below the threshold that applies
 * to them. Each night belongs to the evening whose sunset starts it (up to the next sunset).
 */

export interface WeakTurbulenceEvening {
  /** index into the evenings passed in */
  eveningIndex: number;
  /** threshold applied, m s-1 */
  thresholdMs: number;
  /** night periods with both u* and flux */
  nightPeriods: number;
  weakPeriods: number;
  /** UTC epoch ms of the first and last weak period starts; null when none */
  firstWeakMs: number | null;
  lastWeakMs: number | null;
}

/**
 * Per evening, how many of its night's flux periods fall below the u* threshold.
 *
 * @param startMs UTC epoch ms of period starts, increasing
 * @param ustar friction velocity, m s-1 (NaN = missing)
 * @param flux the filtered flux (NaN = missing)
 * @param night 1 = night (see nightMask)
 * @param sunsetsMs sunset of each evening, UTC epoch ms, increasing; null for polar evenings
 * @param thresholdAt u* threshold (m s-1) for a period start, or null where none is known
 */
export function weakTurbulenceByEvening(
  startMs: Float64Array,
  ustar: Float64Array,
  flux: Float64Array,
  night: Uint8Array,
  sunsetsMs: ReadonlyArray<number | null>,
  thresholdAt: (ms: number) => number | null,
): WeakTurbulenceEvening[] {
  const out: WeakTurbulenceEvening[] = [];
  const order = sunsetsMs
    .map((s, e) => ({ s, e }))
    .filter((x): x is { s: number; e: number } => x.s !== null);
  let i = 0;
  for (let k = 0; k < order.length; k++) {
    const { s, e } = order[k] as { s: number; e: number };
    const next = order[k + 1]?.s ?? s + 86_400_000;
    // a night longer than a day has a gap in the evenings (polar days, missing rows): stop at one day
    const end = Math.min(next, s + 86_400_000);
    while (i < startMs.length && (startMs[i] as number) < s) i++;
    const threshold = thresholdAt(s);
    let nightPeriods = 0;
    let weak = 0;
    let first: number | null = null;
    let last: number | null = null;
    let j = i;
    for (; j < startMs.length && (startMs[j] as number) < end; j++) {
      if (night[j] !== 1 || !Number.isFinite(flux[j]) || !Number.isFinite(ustar[j])) continue;
      nightPeriods++;
      if (threshold !== null && (ustar[j] as number) < threshold) {
        weak++;
        first ??= startMs[j] as number;
        last = startMs[j] as number;
      }
    }
    i = j;
    if (threshold !== null)
      out.push({
        eveningIndex: e,
        thresholdMs: threshold,
        nightPeriods,
        weakPeriods: weak,
        firstWeakMs: first,
        lastWeakMs: last,
      });
  }
  return out;
}
