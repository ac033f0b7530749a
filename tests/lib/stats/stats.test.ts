import { describe, expect, test } from "vitest";
import { chiSquaredDistributionTable } from "simple-statistics";
import { chiSquareIndependence } from "@/lib/stats/chi-square";
import { chiSquareSurvival, regularizedUpperGamma } from "@/lib/stats/gamma";
import { cohensKappa } from "@/lib/stats/kappa";

describe("regularized upper incomplete gamma", () => {
  test.each([
    // Q(1, x) = exp(-x): the exponential distribution's tail (closed form, common practice)
    [1, 0.5, Math.exp(-0.5)],
    [1, 7, Math.exp(-7)],
    // Q(1/2, x) = erfc(sqrt(x)); erfc(1) = 0.157299207050285 (Abramowitz & Stegun 1964, table 7.1)
    [0.5, 1, 0.157299207050285],
    // Q(3, x) = exp(-x)(1 + x + x²/2) for integer a (Abramowitz & Stegun 1964, eq. 6.5.13)
    [3, 2, Math.exp(-2) * (1 + 2 + 2)],
    [3, 12, Math.exp(-12) * (1 + 12 + 72)],
  ])("Q(%d, %d)", (a, x, want) => {
    expect(regularizedUpperGamma(a, x)).toBeCloseTo(want, 12);
  });

  test("rejects a shape that is not positive", () => {
    expect(() => regularizedUpperGamma(0, 1)).toThrow(/a > 0/);
  });
});

describe("chi-square upper tail", () => {
  // The critical values of simple-statistics' table (Pearson's chi-square table, as printed in
  // standard statistics texts) must map back to their tail probabilities.
  type Df = keyof typeof chiSquaredDistributionTable;
  const cases: Array<[Df, 0.1 | 0.05 | 0.01]> = [];
  for (const df of [1, 2, 3, 5, 8, 12, 20, 30] as const) {
    for (const p of [0.1, 0.05, 0.01] as const) cases.push([df, p]);
  }
  test.each(cases)("df %d at the tabulated %d critical value", (df, p) => {
    const critical = chiSquaredDistributionTable[df][p];
    // the table has three decimals, so the probability matches to about 1e-3 relative
    expect(chiSquareSurvival(critical, df)).toBeCloseTo(p, 3);
  });

  test("even degrees of freedom agree with the closed form sum", () => {
    // Q(k, x/2) = exp(-x/2) Σ_{i<k} (x/2)^i / i! (Abramowitz & Stegun 1964, eq. 26.4.21)
    for (const df of [2, 4, 6, 10]) {
      for (const x of [0.3, 3, 9.5, 25, 60]) {
        let term = 1;
        let sum = 1;
        for (let i = 1; i < df / 2; i++) {
          term *= x / 2 / i;
          sum += term;
        }
        expect(chiSquareSurvival(x, df)).toBeCloseTo(Math.exp(-x / 2) * sum, 12);
      }
    }
  });
});

describe("chi-square test of independence", () => {
  // Agresti, A. (2007) An Introduction to Categorical Data Analysis, 2nd ed., Wiley, section 2.4.3,
  // Table 2.5 "Cross classification of party identification by gender" (from memory):
  // X² = 30.1 with df = 2, P < 0.001.
  const partyByGender = [
    [762, 327, 468], // females: Democrat, Independent, Republican
    [484, 239, 477], // males
  ];

  test("Agresti (2007) gender and party identification", () => {
    const r = chiSquareIndependence(partyByGender);
    expect(r.statistic).toBeCloseTo(30.07, 1);
    expect(r.df).toBe(2);
    expect(r.n).toBe(2757);
    // with df = 2 the tail is exactly exp(-X²/2): an independent check of the p-value
    expect(r.pValue).toBeCloseTo(Math.exp(-r.statistic / 2), 14);
    expect(r.pValue).toBeLessThan(0.001);
    // expected count of females who are Democrats: 1557 * 1246 / 2757 (Agresti 2007, Table 2.5: 703.7)
    expect(r.expected[0]?.[0]).toBeCloseTo(703.7, 1);
  });

  test("empty rows and columns leave the degrees of freedom", () => {
    const r = chiSquareIndependence([
      [10, 0, 20],
      [0, 0, 0],
      [15, 0, 5],
    ]);
    expect(r.droppedRows).toEqual([1]);
    expect(r.droppedColumns).toEqual([1]);
    expect(r.df).toBe(1);
  });

  test("a table without association has X² = 0 and p = 1", () => {
    const r = chiSquareIndependence([
      [10, 20],
      [30, 60],
    ]);
    expect(r.statistic).toBeCloseTo(0, 12);
    expect(r.pValue).toBeCloseTo(1, 12);
  });

  test("a single row has no test", () => {
    expect(chiSquareIndependence([[3, 4, 5]]).pValue).toBeNull();
  });

  test("negative counts are refused", () => {
    expect(() => chiSquareIndependence([[1, -1]])).toThrow(/non-negative/);
  });
});

describe("Cohen's kappa", () => {
  test("Wikipedia 'Cohen's kappa', worked example of 50 grant proposals read by two readers (from memory)", () => {
    // yes/yes 20, yes/no 5, no/yes 10, no/no 15: p_o = 0.7, p_e = 0.5, kappa = 0.4
    const r = cohensKappa([
      [20, 5],
      [10, 15],
    ]);
    expect(r.observed).toBeCloseTo(0.7, 12);
    expect(r.expected).toBeCloseTo(0.5, 12);
    expect(r.kappa).toBeCloseTo(0.4, 12);
  });

  test("Cohen (1960) definition: perfect agreement is 1, chance agreement is 0", () => {
    expect(cohensKappa([[5, 0], [0, 7]]).kappa).toBeCloseTo(1, 12);
    expect(cohensKappa([[10, 10], [10, 10]]).kappa).toBeCloseTo(0, 12);
  });

  test("undefined when every item falls into one category", () => {
    expect(cohensKappa([[9, 0], [0, 0]]).kappa).toBeNull();
    expect(cohensKappa([[0, 0], [0, 0]]).kappa).toBeNull();
  });

  test("a table that is not square is refused", () => {
    expect(() => cohensKappa([[1, 2, 3], [4, 5, 6]])).toThrow(/square/);
  });
});
