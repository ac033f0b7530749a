import { gammaln } from "simple-statistics";

/*
 * Regularized incomplete gamma functions, by the power series for x < a + 1 and the Lentz
 * continued fraction otherwise (the standard split; each converges quickly on its side).
 */

const EPS = 1e-15;
const MAX_ITER = 10_000;
const TINY = 1e-300;

function lowerSeries(a: number, x: number): number {
  let term = 1 / a;
  let sum = term;
  for (let n = 1; n < MAX_ITER; n++) {
    term *= x / (a + n);
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * EPS) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - gammaln(a));
}

function upperFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITER; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - gammaln(a)) * h;
}

/**
 * Regularized upper incomplete gamma function Q(a, x) = Γ(a, x) / Γ(a).
 * @param a shape, > 0
 * @param x lower limit of integration, >= 0
 */
export function regularizedUpperGamma(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) throw new RangeError(`regularizedUpperGamma needs a > 0 and x >= 0 (got a=${a}, x=${x})`);
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - lowerSeries(a, x) : upperFraction(a, x);
}

/**
 * Upper-tail probability P(X >= x) of the chi-square distribution with `df` degrees of freedom.
 * @param x statistic, >= 0
 * @param df degrees of freedom, > 0
 */
export function chiSquareSurvival(x: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`degrees of freedom must be > 0 (got ${df})`);
  if (x <= 0) return 1;
  return Math.min(1, Math.max(0, regularizedUpperGamma(df / 2, x / 2)));
}
