import { describe, expect, test } from "vitest";
import { sigmaWOverUstarModel, sigmaWRatio } from "@/lib/physics/similarity";

describe("Kaimal & Finnigan 1994, eq. 1.33: sigma_w/u*", () => {
  test.each([
    [-1, 1.98425], // Kaimal & Finnigan 1994, eq. 1.33
    // domain.md lists 1.36423; 1.25 * 1.3^(1/3) = 1.364241, so this row is checked to 4 decimals
    [-0.1, 1.36423], // Kaimal & Finnigan 1994, eq. 1.33
    [0, 1.25], // Kaimal & Finnigan 1994, eq. 1.33
    [0.5, 1.375], // Kaimal & Finnigan 1994, eq. 1.33
    [1, 1.5], // Kaimal & Finnigan 1994, eq. 1.33
  ])("zeta %d -> %d", (z, ratio) => {
    expect(sigmaWOverUstarModel(z)).toBeCloseTo(ratio, 4);
  });

  test("outside -2..1 the model is undefined unless clamped", () => {
    expect(sigmaWOverUstarModel(3)).toBeNaN();
    expect(sigmaWOverUstarModel(-5)).toBeNaN();
    expect(sigmaWOverUstarModel(3, true)).toBeCloseTo(1.5, 12);
    expect(sigmaWOverUstarModel(-5, true)).toBeCloseTo(1.25 * Math.cbrt(7), 12);
  });

  test("measured/modelled ratio (Foken et al. 2004, from memory: within 30 % is good)", () => {
    expect(sigmaWRatio(0.5, 0.4, 0)).toBeCloseTo(1, 12);
    expect(sigmaWRatio(0.55, 0.2, 1)).toBeCloseTo(0.55 / 0.3, 12);
  });
});
