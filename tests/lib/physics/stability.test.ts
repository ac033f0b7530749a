import { describe, expect, test } from "vitest";
import {
  displacementHeightM,
  golderInverseObukhov,
  obukhovFromTowerM,
  pasquillClass,
  stabilityClass,
  zeta,
  type PasquillClass,
} from "@/lib/physics/stability";

describe("Obukhov length (Foken 2008 formula; numbers computed, domain.md)", () => {
  test.each([
    // [H W/m2, u* m/s, k, L m]
    [-30, 0.2, 0.4, 24.11], // Foken 2008 formula, k = 0.40 (Hogstrom 1996, from memory)
    [-30, 0.2, 0.41, 23.52], // Foken 2008 formula, k = 0.41 variant
    [200, 0.4, 0.4, -28.93], // Foken 2008 formula, unstable example
  ])("H=%d, u*=%d, k=%d -> L=%d m at 15 degC, 101.325 kPa", (h, u, k, l) => {
    expect(obukhovFromTowerM(h, u, 15, 101.325, k)).toBeCloseTo(l, 2);
  });

  test("zeta with z_m = 30 m, h_c = 20 m (d = 2/3 h_c = 13.33 m, Stull 1988 from memory) is 0.691", () => {
    const d = displacementHeightM(20);
    expect(d).toBeCloseTo(13.333, 3);
    expect(zeta(30, d, obukhovFromTowerM(-30, 0.2, 15, 101.325))).toBeCloseTo(0.691, 3);
  });

  test("an explicit displacement height wins over the rule of thumb", () => {
    expect(displacementHeightM(20, 12)).toBe(12);
  });

  test("zero heat flux is neutral: |L| infinite, zeta 0", () => {
    const l = obukhovFromTowerM(0, 0.3, 15, 101.325);
    expect(Math.abs(l)).toBe(Infinity);
    expect(zeta(10, 0, l)).toBeCloseTo(0, 12);
  });
});

describe("stability class from zeta (Mahrt 1998, Gryning et al. 2007; from memory)", () => {
  test.each([
    [-0.5, "unstable"],
    [-0.1, "near-neutral"],
    [0, "near-neutral"],
    [0.1, "near-neutral"],
    [0.5, "weakly-stable"],
    [1, "weakly-stable"],
    [3, "very-stable"],
  ])("zeta %d -> %s", (z, cls) => {
    expect(stabilityClass(z)).toBe(cls);
  });
});

describe("Pasquill classes from L (Golder 1972 as fitted in Seinfeld & Pandis 2006)", () => {
  test.each([
    ["A", -8.0],
    ["B", -15.15],
    ["C", -50.0],
    ["E", 45.45],
    ["F", 14.08],
  ] as Array<[PasquillClass, number]>)("class %s at z0 = 0.1 m has L = %d m", (cls, l) => {
    expect(1 / golderInverseObukhov(cls, 0.1)).toBeCloseTo(l, 2);
    expect(pasquillClass(l, 0.1)).toBe(cls);
  });
  test("neutral (infinite L) is class D", () => {
    expect(golderInverseObukhov("D", 0.1)).toBe(0);
    expect(pasquillClass(Infinity, 0.1)).toBe("D");
    expect(pasquillClass(-1e6, 0.1)).toBe("D");
  });
});
