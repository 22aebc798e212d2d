// Seeded generator and Poisson sampler: moments against the Poisson distribution's known mean and
// variance (both λ) and reproducibility for a fixed seed.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, logFactorial, samplePoisson, sampleStandardNormal } from '../../../src/decay/random.js';

describe('seeded random numbers', () => {
  it('repeats for the same seed and differs for another', () => {
    const a = createSeededRandom(42);
    const b = createSeededRandom(42);
    const c = createSeededRandom(43);
    const first = [a.nextUniform(), a.nextUniform()];
    expect([b.nextUniform(), b.nextUniform()]).toEqual(first);
    expect(c.nextUniform()).not.toBe(first[0]);
  });

  it.each([[0.3], [4], [45], [2500]])('Poisson(%s) has mean and variance λ within 4 standard errors', (mean) => {
    const random = createSeededRandom(7);
    const draws = 20_000;
    let sum = 0;
    let sumSquares = 0;
    for (let i = 0; i < draws; i++) {
      const value = samplePoisson(mean, random);
      expect(Number.isInteger(value)).toBe(true);
      sum += value;
      sumSquares += value * value;
    }
    const sampleMean = sum / draws;
    const sampleVariance = sumSquares / draws - sampleMean * sampleMean;
    // Poisson: E = Var = λ; SE(mean) = √(λ/N); SE(var) ≈ √((2λ² + λ)/N) (fourth cumulant λ).
    expect(Math.abs(sampleMean - mean)).toBeLessThan(4 * Math.sqrt(mean / draws));
    expect(Math.abs(sampleVariance - mean)).toBeLessThan(4 * Math.sqrt((2 * mean * mean + mean) / draws));
  });

  it('P(0) of Poisson(0.3) is exp(−0.3)', () => {
    const random = createSeededRandom(11);
    let zeros = 0;
    const draws = 50_000;
    for (let i = 0; i < draws; i++) if (samplePoisson(0.3, random) === 0) zeros++;
    const p = Math.exp(-0.3);
    expect(Math.abs(zeros / draws - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / draws));
  });

  it('ln k! matches the exact sum across the table/Stirling switch', () => {
    let exact = 0;
    for (let k = 1; k <= 200; k++) {
      exact += Math.log(k);
      expect(logFactorial(k)).toBeCloseTo(exact, 9);
    }
  });

  it('normal deviates have mean 0 and variance 1', () => {
    const random = createSeededRandom(3);
    let sum = 0;
    let sumSquares = 0;
    for (let i = 0; i < 20_000; i++) {
      const value = sampleStandardNormal(random);
      sum += value;
      sumSquares += value * value;
    }
    expect(Math.abs(sum / 20_000)).toBeLessThan(4 / Math.sqrt(20_000));
    expect(Math.abs(sumSquares / 20_000 - 1)).toBeLessThan(4 * Math.sqrt(2 / 20_000));
  });
});
