import { CP_AIR, GRAVITY, KELVIN, dryAirDensityKgM3, kinematicHeatFluxKms } from "./air";

/**
 * Monin-Obukhov stability: Obukhov length, zeta = (z_m - d)/L, stability classes.
 * L = -u*^3 theta_v / (k g w'theta_v') (Foken 2008, Micrometeorology), k = 0.40
 * (Hogstrom 1996; 0.41 also in use), g = 9.81 m s-2.
 */

/** von Karman constant (Hogstrom 1996). */
export const VON_KARMAN = 0.4;

/**
 * Obukhov length from kinematic fluxes.
 * @param frictionVelocityMs u*, m s-1
 * @param temperatureK theta_v (or T when humidity is unknown), K
 * @param kinematicHeatFluxKms w'theta_v', K m s-1
 * @returns L in m: negative unstable, positive stable, +/-Infinity for zero flux
 */
export function obukhovLengthM(
  frictionVelocityMs: number,
  temperatureK: number,
  kinematicHeatFluxKms: number,
  vonKarman = VON_KARMAN,
  gravityMs2 = GRAVITY,
): number {
  return -(frictionVelocityMs ** 3 * temperatureK) / (vonKarman * gravityMs2 * kinematicHeatFluxKms);
}

/**
 * Obukhov length from tower quantities; the buoyancy flux is approximated by the sensible heat
 * flux and T stands in for theta_v (the moisture term is a few percent over land).
 * @param sensibleHeatFluxWm2 H, W m-2
 * @param frictionVelocityMs u*, m s-1
 * @param temperatureC TA, degC
 * @param pressureKPa PA, kPa
 * @returns m
 */
export function obukhovFromTowerM(
  sensibleHeatFluxWm2: number,
  frictionVelocityMs: number,
  temperatureC: number,
  pressureKPa: number,
  vonKarman = VON_KARMAN,
): number {
  const tK = temperatureC + KELVIN;
  const rho = dryAirDensityKgM3(pressureKPa * 1000, tK);
  return obukhovLengthM(frictionVelocityMs, tK, kinematicHeatFluxKms(sensibleHeatFluxWm2, rho, CP_AIR), vonKarman);
}

/**
 * Zero-plane displacement height; rule of thumb d = 2/3 h_c (Stull 1988) unless given.
 * @returns m
 */
export function displacementHeightM(canopyHeightM: number, displacementM?: number | null): number {
  return displacementM ?? (2 / 3) * canopyHeightM;
}

/**
 * Stability parameter zeta = (z_m - d) / L.
 * @param measurementHeightM z_m, m
 * @param displacementM d, m
 * @param obukhovM L, m
 */
export function zeta(measurementHeightM: number, displacementM: number, obukhovM: number): number {
  return (measurementHeightM - displacementM) / obukhovM;
}

export type StabilityClass = "unstable" | "near-neutral" | "weakly-stable" | "very-stable";

/**
 * Stability class from zeta (conventions vary; after Mahrt 1998 and Gryning et al. 2007):
 * unstable < -0.1, near-neutral |zeta| <= 0.1, weakly stable (0.1, 1], very stable > 1.
 */
export function stabilityClass(z: number): StabilityClass {
  if (z < -0.1) return "unstable";
  if (z <= 0.1) return "near-neutral";
  if (z <= 1) return "weakly-stable";
  return "very-stable";
}

export type PasquillClass = "A" | "B" | "C" | "D" | "E" | "F";

/** Golder (1972) as fitted in Seinfeld & Pandis (2006): 1/L = a + b log10(z0). */
const GOLDER: Record<PasquillClass, readonly [number, number]> = {
  A: [-0.096, 0.029],
  B: [-0.037, 0.029],
  C: [-0.002, 0.018],
  D: [0, 0],
  E: [0.004, -0.018],
  F: [0.035, -0.036],
};
const PASQUILL_ORDER: readonly PasquillClass[] = ["A", "B", "C", "D", "E", "F"];

/**
 * Representative inverse Obukhov length of a Pasquill class at a roughness length (Golder 1972).
 * @param roughnessM z0, m
 * @returns 1/L, m-1
 */
export function golderInverseObukhov(cls: PasquillClass, roughnessM: number): number {
  const [a, b] = GOLDER[cls];
  return a + b * Math.log10(roughnessM);
}

/**
 * Pasquill class whose Golder curve is nearest in 1/L (class boundaries at the midpoints).
 * @param obukhovM L, m (+/-Infinity for neutral)
 * @param roughnessM z0, m
 */
export function pasquillClass(obukhovM: number, roughnessM: number): PasquillClass {
  const inv = 1 / obukhovM;
  let best: PasquillClass = "D";
  let bestDist = Infinity;
  for (const cls of PASQUILL_ORDER) {
    const dist = Math.abs(inv - golderInverseObukhov(cls, roughnessM));
    if (dist < bestDist) {
      bestDist = dist;
      best = cls;
    }
  }
  return best;
}
