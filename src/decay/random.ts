// Seeded pseudo-random numbers for simulations and tests: a uniform generator (mulberry32), a normal
// deviate (Box–Muller) and an exact Poisson sampler. The core never draws unseeded randomness.
import { itemAt } from '../model/item-at.js';

/** A source of uniform deviates in [0, 1). */
export interface UniformSource {
  nextUniform(): number;
}

/** Seeded uniform generator in [0, 1) (mulberry32, a 32-bit public-domain generator by T. Ettinger); period 2³². */
export function createSeededRandom(seed: number): UniformSource {
  let state = seed >>> 0;
  return {
    nextUniform(): number {
      state = (state + 0x6d2b79f5) >>> 0;
      let mixed = state;
      mixed = Math.imul(mixed ^ (mixed >>> 15), mixed | 1);
      mixed ^= mixed + Math.imul(mixed ^ (mixed >>> 7), mixed | 61);
      return ((mixed ^ (mixed >>> 14)) >>> 0) / 4294967296;
    },
  };
}

/** Standard normal deviate by the Box–Muller transform (Box & Muller, Ann. Math. Stat. 29, 610 (1958)). */
export function sampleStandardNormal(random: UniformSource): number {
  let u1 = random.nextUniform();
  while (u1 <= 0) u1 = random.nextUniform();
  const u2 = random.nextUniform();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

const LOG_FACTORIAL_TABLE: number[] = [0];
for (let k = 1; k < 32; k++) LOG_FACTORIAL_TABLE.push(itemAt(LOG_FACTORIAL_TABLE, k - 1) + Math.log(k));

/** ln(k!) for integer k ≥ 0: exact sum below 32, Stirling series with three correction terms above (error < 1e-15 relative). */
export function logFactorial(k: number): number {
  if (k < 32) return itemAt(LOG_FACTORIAL_TABLE, k);
  const x = k + 1;
  const inverse = 1 / x;
  const inverse2 = inverse * inverse;
  return (
    (x - 0.5) * Math.log(x) -
    x +
    0.5 * Math.log(2 * Math.PI) +
    inverse * (1 / 12 - inverse2 * (1 / 360 - inverse2 / 1260))
  );
}

/**
 * Poisson deviate with mean `mean` (counts) by exact inversion over outcomes ordered outward from the
 * mode (mode, mode+1, mode−1, …); any fixed ordering of the support gives an exact sampler. O(√mean).
 */
export function samplePoisson(mean: number, random: UniformSource): number {
  if (!(mean > 0)) return 0;
  const mode = Math.floor(mean);
  const logMean = Math.log(mean);
  const modeProbability = Math.exp(mode * logMean - mean - logFactorial(mode));
  const u = random.nextUniform();
  let cumulative = modeProbability;
  if (u < cumulative) return mode;
  let up = mode;
  let down = mode;
  let upProbability = modeProbability;
  let downProbability = modeProbability;
  for (;;) {
    upProbability *= mean / (up + 1);
    up += 1;
    cumulative += upProbability;
    if (u < cumulative) return up;
    if (down > 0) {
      downProbability *= down / mean;
      down -= 1;
      cumulative += downProbability;
      if (u < cumulative) return down;
    }
    if (upProbability < 1e-300 && (down === 0 || downProbability < 1e-300)) return mode;
  }
}
