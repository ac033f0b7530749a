import { describe, expect, test } from "vitest";
import {
  dewPointC,
  dewPointFromVapourPressureC,
  saturationVapourPressureHPa,
  vapourPressureHPa,
} from "@/lib/physics/humidity";

describe("WMO saturation vapour pressure", () => {
  test.each([
    [20, 23.326], // WMO-No. 8 Annex 4.B
    [30, 42.337], // WMO-No. 8 Annex 4.B
  ])("e_w(%d degC) = %d hPa", (t, e) => {
    expect(saturationVapourPressureHPa(t)).toBeCloseTo(e, 3);
  });
});

describe("dew point inverts the WMO formula", () => {
  test.each([
    [20, 100, 20],
    [25, 50],
    [-5, 80],
    [35, 15],
  ])("TA %d degC, RH %d %%", (t, rh, expected?: number) => {
    const td = dewPointC(t, rh);
    if (expected !== undefined) expect(td).toBeCloseTo(expected, 9);
    expect(saturationVapourPressureHPa(td)).toBeCloseTo(vapourPressureHPa(t, rh), 9);
    expect(dewPointFromVapourPressureC(vapourPressureHPa(t, rh))).toBeCloseTo(td, 9);
    expect(td).toBeLessThanOrEqual(t + 1e-12);
  });
  test("RH 0 or missing gives NaN", () => {
    expect(dewPointC(20, 0)).toBeNaN();
    expect(dewPointC(20, Number.NaN)).toBeNaN();
  });
});
