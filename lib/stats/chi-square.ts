import { chiSquareSurvival } from "./gamma";

export interface ChiSquareResult {
  /** Pearson's X² statistic */
  statistic: number;
  /** degrees of freedom (r - 1)(c - 1) over the rows and columns that have any counts */
  df: number;
  /** upper-tail probability of X² under independence; null when df = 0 */
  pValue: number | null;
  /** total count */
  n: number;
  /** expected counts under independence, same shape as the input (0 for empty rows/columns) */
  expected: number[][];
  /** share of non-empty cells whose expected count is below 5 (the usual caution, common practice) */
  smallExpectedShare: number;
  /** rows and columns left out because all their counts are zero */
  droppedRows: number[];
  droppedColumns: number[];
}

/**
 * Pearson's chi-square test of independence for an r x c table of counts. Rows or columns with
 * no counts carry no information about association and are left out of the degrees of freedom.
 * @param table counts, table[row][column], non-negative
 */
export function chiSquareIndependence(table: readonly (readonly number[])[]): ChiSquareResult {
  const rows = table.length;
  const cols = rows === 0 ? 0 : Math.max(...table.map((r) => r.length));
  const cell = (i: number, j: number) => table[i]?.[j] ?? 0;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const v = cell(i, j);
      if (!(v >= 0) || !Number.isFinite(v)) throw new RangeError(`count at row ${i}, column ${j} is not a non-negative number`);
    }
  }
  const rowSums = Array.from({ length: rows }, (_, i) => Array.from({ length: cols }, (_, j) => cell(i, j)).reduce((a, b) => a + b, 0));
  const colSums = Array.from({ length: cols }, (_, j) => rowSums.reduce((a, _r, i) => a + cell(i, j), 0));
  const n = rowSums.reduce((a, b) => a + b, 0);
  const droppedRows = rowSums.flatMap((s, i) => (s === 0 ? [i] : []));
  const droppedColumns = colSums.flatMap((s, j) => (s === 0 ? [j] : []));
  const expected = rowSums.map((rs) => colSums.map((cs) => (n > 0 ? (rs * cs) / n : 0)));
  let statistic = 0;
  let small = 0;
  let cells = 0;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const e = expected[i]?.[j] ?? 0;
      if (e <= 0) continue;
      cells++;
      if (e < 5) small++;
      const d = cell(i, j) - e;
      statistic += (d * d) / e;
    }
  }
  const df = Math.max(0, (rows - droppedRows.length - 1) * (cols - droppedColumns.length - 1));
  return {
    statistic,
    df,
    pValue: df > 0 ? chiSquareSurvival(statistic, df) : null,
    n,
    expected,
    smallExpectedShare: cells > 0 ? small / cells : 0,
    droppedRows,
    droppedColumns,
  };
}
