import { expect, test } from "vitest";
import { mad, median, modifiedZ } from "@/lib/physics/robust";

test("modified z of [1, 2, 3, 4, 100] (Iglewicz & Hoaglin 1993)", () => {
  const m = modifiedZ([1, 2, 3, 4, 100]);
  const expected = [-1.349, -0.6745, 0, 0.6745, 65.43]; // Iglewicz & Hoaglin 1993, M = 0.6745 (x - med)/MAD
  expected.forEach((e, i) => expect(m[i]).toBeCloseTo(e, 2));
  expect(median([1, 2, 3, 4, 100])).toBe(3);
  expect(mad([1, 2, 3, 4, 100])).toBe(1);
});

test("missing values are skipped; MAD 0 gives NaN scores", () => {
  expect(median([Number.NaN, 5, 1])).toBe(3);
  expect(median([])).toBeNaN();
  const m = modifiedZ([2, 2, 2, Number.NaN]);
  expect(Array.from(m).every(Number.isNaN)).toBe(true);
});
