/**
 * Flux-variance similarity for the vertical wind (Kaimal & Finnigan 1994, eq. 1.33):
 * sigma_w/u* = 1.25 (1 - 3 zeta)^(1/3) for -2 <= zeta <= 0, 1.25 (1 + 0.2 zeta) for 0 <= zeta <= 1.
 */

export const SIMILARITY_ZETA_MIN = -2;
export const SIMILARITY_ZETA_MAX = 1;

/**
 * Modelled sigma_w / u* at a stability zeta.
 * @param z zeta = (z_m - d)/L, dimensionless
 * @param clamp clamp zeta into the model's range [-2, 1] instead of returning NaN outside it
 */
export function sigmaWOverUstarModel(z: number, clamp = false): number {
  let zz = z;
  if (clamp) zz = Math.min(SIMILARITY_ZETA_MAX, Math.max(SIMILARITY_ZETA_MIN, z));
  if (!(zz >= SIMILARITY_ZETA_MIN && zz <= SIMILARITY_ZETA_MAX)) return Number.NaN;
  return zz <= 0 ? 1.25 * Math.cbrt(1 - 3 * zz) : 1.25 * (1 + 0.2 * zz);
}

/**
 * Measured over modelled sigma_w; within 0.7-1.3 is "good" (Foken et al. 2004), a data-quality signal.
 * @param sigmaWMs measured sigma_w, m s-1
 * @param frictionVelocityMs u*, m s-1
 * @param z zeta
 */
export function sigmaWRatio(sigmaWMs: number, frictionVelocityMs: number, z: number): number {
  return sigmaWMs / (frictionVelocityMs * sigmaWOverUstarModel(z));
}
