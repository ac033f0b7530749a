export interface AgreementResult {
  /** number of items rated by both */
  n: number;
  /** observed proportion of agreement p_o */
  observed: number;
  /** agreement expected by chance from the marginals p_e */
  expected: number;
  /** Cohen's kappa (p_o - p_e) / (1 - p_e); null when undefined (no items, or p_e = 1) */
  kappa: number | null;
}

/**
 * Overall agreement and Cohen's (1960) kappa for a square confusion table of two raters.
 * @param table counts, table[categoryOfRaterA][categoryOfRaterB]
 */
export function cohensKappa(table: readonly (readonly number[])[]): AgreementResult {
  const k = table.length;
  for (const row of table) {
    if (row.length !== k) throw new RangeError("the confusion table must be square");
    for (const v of row) if (!(v >= 0) || !Number.isFinite(v)) throw new RangeError("counts must be non-negative numbers");
  }
  const cell = (i: number, j: number) => table[i]?.[j] ?? 0;
  let n = 0;
  let diagonal = 0;
  const rowSums = new Array<number>(k).fill(0);
  const colSums = new Array<number>(k).fill(0);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const v = cell(i, j);
      n += v;
      rowSums[i] = (rowSums[i] ?? 0) + v;
      colSums[j] = (colSums[j] ?? 0) + v;
      if (i === j) diagonal += v;
    }
  }
  if (n === 0) return { n, observed: 0, expected: 0, kappa: null };
  const observed = diagonal / n;
  let expected = 0;
  for (let i = 0; i < k; i++) expected += ((rowSums[i] ?? 0) / n) * ((colSums[i] ?? 0) / n);
  const kappa = expected >= 1 ? null : (observed - expected) / (1 - expected);
  return { n, observed, expected, kappa };
}
