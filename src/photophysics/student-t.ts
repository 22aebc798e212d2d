// Student t distribution function for significance tests of fitted coefficients (curvature terms of
// dilution and quenching series), via the regularized incomplete beta function.
import { itemAt } from '../model/item-at.js';

/** ln Γ(x) for x > 0 by the Lanczos approximation (g = 7, 9 terms; Press et al., Numerical Recipes 3rd ed. §6.1); ~1e-15 relative. */
export function logGamma(x: number): number {
  const coefficients = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let sum = itemAt(coefficients, 0);
  for (let i = 1; i < 9; i++) sum += itemAt(coefficients, i) / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

/** Continued fraction of I_x(a, b) by the modified Lentz method (Abramowitz & Stegun 26.5.8; Numerical Recipes §6.4). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-15) break;
  }
  return h;
}

/** Regularized incomplete beta I_x(a, b) for 0 ≤ x ≤ 1 (Abramowitz & Stegun 26.5.8 continued fraction; Numerical Recipes §6.4). */
export function regularizedIncompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** Upper-tail probability P(T > t) of Student's t with `degreesOfFreedom` (A&S 26.7.1: ½·I_{ν/(ν+t²)}(ν/2, ½) for t ≥ 0). */
export function studentTUpperTail(t: number, degreesOfFreedom: number): number {
  if (!(degreesOfFreedom > 0) || Number.isNaN(t)) return Number.NaN;
  const half =
    0.5 * regularizedIncompleteBeta(degreesOfFreedom / (degreesOfFreedom + t * t), degreesOfFreedom / 2, 0.5);
  return t >= 0 ? half : 1 - half;
}

/** Two-sided p-value P(|T| > |t|) of Student's t with `degreesOfFreedom` (A&S 26.7.1). */
export function studentTTwoSidedPValue(t: number, degreesOfFreedom: number): number {
  return 2 * studentTUpperTail(Math.abs(t), degreesOfFreedom);
}
