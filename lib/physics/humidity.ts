/**
 * Saturation vapour pressure over water and dew point, WMO-No. 8 (Guide to Instruments and
 * Methods of Observation), Annex 4.B: e_w = 6.112 exp(17.62 t / (243.12 + t)) hPa.
 */

const A = 17.62;
const B_DEGC = 243.12;
const E0_HPA = 6.112;

/**
 * Saturation vapour pressure over water.
 * @param temperatureC air temperature, degC
 * @returns hPa
 */
export function saturationVapourPressureHPa(temperatureC: number): number {
  return E0_HPA * Math.exp((A * temperatureC) / (B_DEGC + temperatureC));
}

/**
 * Vapour pressure from temperature and relative humidity.
 * @param temperatureC degC
 * @param relativeHumidityPct %
 * @returns hPa
 */
export function vapourPressureHPa(temperatureC: number, relativeHumidityPct: number): number {
  return (relativeHumidityPct / 100) * saturationVapourPressureHPa(temperatureC);
}

/**
 * Dew point by inverting the WMO formula at e = RH/100 e_w(t).
 * @param temperatureC degC
 * @param relativeHumidityPct %, > 0
 * @returns degC; NaN for RH <= 0
 */
export function dewPointC(temperatureC: number, relativeHumidityPct: number): number {
  if (!(relativeHumidityPct > 0)) return Number.NaN;
  const g = Math.log(relativeHumidityPct / 100) + (A * temperatureC) / (B_DEGC + temperatureC);
  return (B_DEGC * g) / (A - g);
}

/**
 * Temperature at which the saturation vapour pressure equals e (inverse of the WMO formula).
 * @param vapourPressure hPa
 * @returns degC
 */
export function dewPointFromVapourPressureC(vapourPressure: number): number {
  const g = Math.log(vapourPressure / E0_HPA);
  return (B_DEGC * g) / (A - g);
}
