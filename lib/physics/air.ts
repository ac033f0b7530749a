/**
 * Air density, kinematic heat flux and standard-atmosphere pressure.
 * Constants: R_d = 287.05 J kg-1 K-1, R_v = 461.5 J kg-1 K-1, cp = 1005 J kg-1 K-1,
 * g = 9.81 m s-2 (common practice; ICAO Doc 7488 / ISO 2533 for the standard atmosphere).
 */

/** Gas constant of dry air, J kg-1 K-1. */
export const R_DRY = 287.05;
/** Gas constant of water vapour, J kg-1 K-1. */
export const R_VAPOUR = 461.5;
/** Specific heat of air at constant pressure, J kg-1 K-1. */
export const CP_AIR = 1005;
/** Gravitational acceleration, m s-2. */
export const GRAVITY = 9.81;
/** 0 degC in kelvin. */
export const KELVIN = 273.15;

/** ISA sea-level pressure, Pa; temperature, K; tropospheric lapse rate, K m-1 (ICAO Doc 7488). */
const ISA_P0_PA = 101_325;
const ISA_T0_K = 288.15;
const ISA_LAPSE_K_PER_M = 0.0065;
/** g M / (R* L) with the ISA's g0 = 9.80665 and M = 0.0289644 kg/mol. */
const ISA_EXPONENT = (9.80665 * 0.0289644) / (8.3144598 * ISA_LAPSE_K_PER_M);

/**
 * Dry-air density rho = p / (R_d T).
 * @param pressurePa air pressure, Pa
 * @param temperatureK air temperature, K
 * @returns kg m-3
 */
export function dryAirDensityKgM3(pressurePa: number, temperatureK: number): number {
  return pressurePa / (R_DRY * temperatureK);
}

/**
 * Moist-air density as the sum of the dry-air and water-vapour partial densities.
 * @param pressurePa total pressure, Pa
 * @param temperatureK air temperature, K
 * @param vapourPressurePa partial pressure of water vapour, Pa
 * @returns kg m-3
 */
export function moistAirDensityKgM3(pressurePa: number, temperatureK: number, vapourPressurePa: number): number {
  return (pressurePa - vapourPressurePa) / (R_DRY * temperatureK) + vapourPressurePa / (R_VAPOUR * temperatureK);
}

/**
 * Virtual temperature T_v = T / (1 - (e/p)(1 - R_d/R_v)).
 * @returns K
 */
export function virtualTemperatureK(temperatureK: number, vapourPressurePa: number, pressurePa: number): number {
  return temperatureK / (1 - (vapourPressurePa / pressurePa) * (1 - R_DRY / R_VAPOUR));
}

/**
 * Kinematic sensible heat flux w'theta' = H / (rho cp).
 * @param sensibleHeatFluxWm2 H, W m-2
 * @param densityKgM3 air density, kg m-3
 * @returns K m s-1
 */
export function kinematicHeatFluxKms(sensibleHeatFluxWm2: number, densityKgM3: number, cpJkgK = CP_AIR): number {
  return sensibleHeatFluxWm2 / (densityKgM3 * cpJkgK);
}

/**
 * ISA (barometric formula, troposphere) pressure at an elevation; used when a file has no PA.
 * @param elevationM metres above sea level
 * @returns Pa
 */
export function standardPressurePa(elevationM: number): number {
  return ISA_P0_PA * Math.pow(1 - (ISA_LAPSE_K_PER_M * elevationM) / ISA_T0_K, ISA_EXPONENT);
}

/**
 * ISA temperature at an elevation (troposphere).
 * @returns K
 */
export function standardTemperatureK(elevationM: number): number {
  return ISA_T0_K - ISA_LAPSE_K_PER_M * elevationM;
}
