import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { directionStats, normalizeDeg, signedShiftDeg, vectorMeanDeg, yamartinoSigmaDeg } from "@/lib/physics/wind";

function circDist(a: number, b: number): number {
  return Math.abs(signedShiftDeg(a, b));
}

describe("unit-vector mean and Yamartino sigma_theta (Yamartino 1984, J. Clim. Appl. Meteor. 23)", () => {
  test.each([
    [[350, 10], 0, 10.008], // Yamartino 1984 estimator; domain.md check
    [[10, 20, 30], 20, 8.165], // Yamartino 1984 estimator; domain.md check
    [[340, 350, 0, 10, 20], 0, 14.149], // Yamartino 1984 estimator; domain.md check
  ])("%j -> mean %d, sigma %d", (dirs, mean, sigma) => {
    expect(circDist(vectorMeanDeg(dirs) as number, mean)).toBeLessThan(1e-9);
    expect(yamartinoSigmaDeg(dirs)).toBeCloseTo(sigma, 3);
  });

  test("{0, 90, 180, 270} has no mean (R = 0; domain.md)", () => {
    expect(vectorMeanDeg([0, 90, 180, 270])).toBeNull();
    expect(directionStats([0, 90, 180, 270]).sigmaThetaDeg).toBeNull();
  });

  test("calm rows (below 0.5 m/s, common practice) and missing values are skipped", () => {
    const dirs = new Float64Array([90, 270, Number.NaN, 100]);
    const ws = new Float64Array([2, 0.2, 3, 2]);
    const s = directionStats(dirs, 0, 4, ws, 0.5);
    expect(s.count).toBe(2);
    expect(s.meanDeg).toBeCloseTo(95, 9);
    expect(directionStats(dirs, 1, 2, ws, 0.5).meanDeg).toBeNull();
  });
});

describe("signed shift ((b - a + 540) mod 360) - 180", () => {
  test.each([
    [350, 20, 30], // domain.md
    [20, 350, -30],
    [0, 180, -180],
    [90, 90, 0],
    [-10, 10, 20],
    [720, 10, 10],
  ])("%d -> %d is %d", (a, b, s) => {
    expect(signedShiftDeg(a, b)).toBeCloseTo(s, 9);
  });
});

const angle = fc.double({ min: 0, max: 360, maxExcluded: true, noNaN: true });

describe("circular statistics properties (fast-check)", () => {
  test("rotating every direction rotates the mean", () => {
    fc.assert(
      fc.property(fc.array(angle, { minLength: 1, maxLength: 20 }), angle, (dirs, rot) => {
        const m = vectorMeanDeg(dirs);
        const mr = vectorMeanDeg(dirs.map((d) => d + rot));
        if (m === null || directionStats(dirs).resultantLength < 1e-3) return true;
        expect(mr).not.toBeNull();
        expect(circDist(mr as number, normalizeDeg(m + rot))).toBeLessThan(1e-6);
        return true;
      }),
    );
  });

  test("sigma_theta is rotation invariant and within [0, 103.9] deg", () => {
    fc.assert(
      fc.property(fc.array(angle, { minLength: 1, maxLength: 20 }), angle, (dirs, rot) => {
        const s = yamartinoSigmaDeg(dirs) as number;
        expect(s).toBeGreaterThanOrEqual(0);
        expect(s).toBeLessThanOrEqual(103.91);
        expect(yamartinoSigmaDeg(dirs.map((d) => d + rot))).toBeCloseTo(s, 4);
      }),
    );
  });

  test("shift(a, b) = -shift(b, a) except at exactly 180, and stays in [-180, 180)", () => {
    fc.assert(
      fc.property(angle, angle, (a, b) => {
        const ab = signedShiftDeg(a, b);
        const ba = signedShiftDeg(b, a);
        expect(ab).toBeGreaterThanOrEqual(-180);
        expect(ab).toBeLessThan(180);
        if (Math.abs(Math.abs(ab) - 180) > 1e-9) expect(ab + ba).toBeCloseTo(0, 9);
      }),
    );
  });

  test("the mean stays in [0, 360)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e4, max: 1e4, noNaN: true }), { minLength: 1, maxLength: 20 }), (dirs) => {
        const m = vectorMeanDeg(dirs);
        if (m !== null) {
          expect(m).toBeGreaterThanOrEqual(0);
          expect(m).toBeLessThan(360);
        }
      }),
    );
  });
});
