// False-positive rates of the photophysics warnings on clean, seeded data (issue 17.5). Each warning is a
// significance test at a stated α; on data that follow the null model exactly (linear series with
// independent Gaussian noise) its rate must stay below 5 %. Rates are estimated over 2000 seeded series;
// the binomial standard error of a 5 % rate is then 0.5 %, so "< 5 %" is checked with margin.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, sampleStandardNormal } from '../../../src/decay/random.js';
import { gradientQuantumYield } from '../../../src/photophysics/gradient-yield.js';
import { solveKineticScheme } from '../../../src/photophysics/kinetic-scheme.js';
import { sternVolmer } from '../../../src/photophysics/stern-volmer.js';

const SERIES = 2000;
const absorbances = [0.02, 0.04, 0.06, 0.08, 0.1];
const longAbsorbances = [0.01, 0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09, 0.1];
const concentrationsM = [0, 0.01, 0.02, 0.03, 0.04, 0.05];

type Noise = 'relative' | 'absolute';

/** Fraction of clean gradient series (Φ 0.5 vs 0.5, same solvent) whose warnings match `pattern`. */
function gradientRate(pattern: RegExp, noise: Noise, xs: readonly number[], seed: number): number {
  const random = createSeededRandom(seed);
  const series = (): number[] =>
    xs.map((a) => {
      const clean = 4e7 * a;
      const sd = noise === 'relative' ? 0.01 * clean : 0.01 * 4e7 * 0.1;
      return clean + sd * sampleStandardNormal(random);
    });
  let hits = 0;
  for (let i = 0; i < SERIES; i++) {
    const result = gradientQuantumYield({
      sample: { absorbances: xs, integrals: series() },
      reference: { absorbances: xs, integrals: series() },
      referenceYield: 0.5,
      sampleRefractiveIndex: 1.333,
      referenceRefractiveIndex: 1.333,
      uncertainties: { referenceYield: 0.01 },
    });
    // Count series, not calls: each call fits two series.
    hits += result.warnings.filter((w) => pattern.test(w)).length;
  }
  return hits / (2 * SERIES);
}

/** Fraction of clean, linear (purely dynamic, K_SV = 20 M⁻¹) intensity-only quenching series called `combined`. */
function sternVolmerCombinedRate(noise: Noise, seed: number, input: 'intensities' | 'ratios'): number {
  const random = createSeededRandom(seed);
  let hits = 0;
  for (let i = 0; i < SERIES; i++) {
    const intensities = concentrationsM.map((q) => {
      const clean = 1e6 / (1 + 20 * q);
      const sd = noise === 'relative' ? 0.01 * clean : 0.01 * 1e6 * 0.5;
      return clean + sd * sampleStandardNormal(random);
    });
    const f0 = intensities[0] as number;
    const result = sternVolmer(
      input === 'intensities'
        ? { concentrationsM, intensities, tau0Ns: 4 }
        : { concentrationsM, intensityRatios: intensities.map((f) => f0 / f), tau0Ns: 4 },
    );
    if (result.mechanism === 'combined') hits++;
  }
  return hits / SERIES;
}

describe('warning false-positive rates on clean data (seeded, 2000 series each)', () => {
  it('still detects combined quenching (K_D = 10, K_S = 30 M⁻¹, 1 % noise) in most intensity-only series', () => {
    const random = createSeededRandom(1704);
    let detected = 0;
    const trials = 500;
    for (let i = 0; i < trials; i++) {
      const intensities = concentrationsM.map(
        (q) => (1e6 / ((1 + 10 * q) * (1 + 30 * q))) * (1 + 0.01 * sampleStandardNormal(random)),
      );
      if (sternVolmer({ concentrationsM, intensities, tau0Ns: 4 }).mechanism === 'combined') detected++;
    }
    console.info(`Stern–Volmer power, combined 10/30 M⁻¹, 1 % noise: ${((100 * detected) / trials).toFixed(1)} %`);
    expect(detected / trials).toBeGreaterThan(0.8);
  });

  it.each<[string, RegExp, Noise, readonly number[]]>([
    [
      'gradient: systematic residual pattern, 5 points, 1 % relative noise',
      /systematic pattern/,
      'relative',
      absorbances,
    ],
    ['gradient: systematic residual pattern, 5 points, constant noise', /systematic pattern/, 'absolute', absorbances],
    [
      'gradient: systematic residual pattern, 10 points, 1 % relative noise',
      /systematic pattern/,
      'relative',
      longAbsorbances,
    ],
    ['gradient: curvature, 5 points, 1 % relative noise', /curves/, 'relative', absorbances],
    ['gradient: curvature, 5 points, constant noise', /curves/, 'absolute', absorbances],
    ['gradient: curvature, 10 points, constant noise', /curves/, 'absolute', longAbsorbances],
    ['gradient: not linear (R²), 5 points, constant noise', /not linear/, 'absolute', absorbances],
  ])('%s stays below 5 percent', (label, pattern, noise, xs) => {
    const rate = gradientRate(pattern, noise, xs, 1701);
    console.info(`FP ${label}: ${(100 * rate).toFixed(2)} %`);
    expect(rate).toBeLessThan(0.05);
  });

  it.each<[Noise, 'intensities' | 'ratios']>([
    ['relative', 'intensities'],
    ['absolute', 'intensities'],
    ['relative', 'ratios'],
    ['absolute', 'ratios'],
  ])('Stern–Volmer calls under 5 percent of linear series combined (%s noise, %s given)', (noise, input) => {
    const rate = sternVolmerCombinedRate(noise, 1702, input);
    console.info(`FP Stern–Volmer combined, ${noise} noise, ${input}: ${(100 * rate).toFixed(2)} %`);
    expect(rate).toBeLessThan(0.05);
  });
});

/** log-uniform draw between two times in s. */
function logUniform(random: { nextUniform(): number }, lowS: number, highS: number): number {
  return Math.exp(Math.log(lowS) + random.nextUniform() * (Math.log(highS) - Math.log(lowS)));
}

describe('kinetic-scheme plausibility warnings on ordinary molecules (seeded, 500 schemes)', () => {
  it('stays silent for ordinary S0/S1/S2/T1 schemes, including S1→S0 internal conversion and T1→S0 crossing', () => {
    // Ordinary times (REFERENCES.md trade time scales; to-ground ranges practice): S2→S1 IC 10 fs–10 ps,
    // fluorescence 1–100 ns, S1→S0 IC 100 ps–1 µs, S1→T1 ISC 0.1–10 ns, phosphorescence 1 ms–10 s, T1→S0 ISC 1 µs–1 s.
    const random = createSeededRandom(1703);
    let warned = 0;
    const schemes = 500;
    for (let i = 0; i < schemes; i++) {
      const rate = (low: number, high: number): number => 1 / logUniform(random, low, high);
      const result = solveKineticScheme({
        initialPopulation: { S2: 1 },
        processes: [
          { kind: 'internal-conversion', from: 'S2', to: 'S1', ratePerS: rate(1e-14, 1e-11) },
          { kind: 'fluorescence', from: 'S1', to: 'S0', ratePerS: rate(1e-9, 1e-7) },
          { kind: 'internal-conversion', from: 'S1', to: 'S0', ratePerS: rate(1e-10, 1e-6) },
          { kind: 'intersystem-crossing', from: 'S1', to: 'T1', ratePerS: rate(1e-10, 1e-8) },
          { kind: 'phosphorescence', from: 'T1', to: 'S0', ratePerS: rate(1e-3, 10) },
          { kind: 'intersystem-crossing', from: 'T1', to: 'S0', ratePerS: rate(1e-6, 1) },
        ],
        timesS: [0],
      });
      if (result.warnings.length > 0) warned++;
    }
    console.info(`FP kinetic-scheme plausibility: ${((100 * warned) / schemes).toFixed(2)} %`);
    expect(warned / schemes).toBeLessThan(0.05);
  });

  it('still warns for an S2→S1 internal conversion of 20 ns and an S1→T1 crossing of 1 ms (trade tables)', () => {
    const result = solveKineticScheme({
      initialPopulation: { S2: 1 },
      processes: [
        { kind: 'internal-conversion', from: 'S2', to: 'S1', ratePerS: 5e7 },
        { kind: 'fluorescence', from: 'S1', to: 'S0', ratePerS: 1e8 },
        { kind: 'intersystem-crossing', from: 'S1', to: 'T1', ratePerS: 1e3 },
        { kind: 'phosphorescence', from: 'T1', to: 'S0', ratePerS: 1e2 },
      ],
      timesS: [0],
    });
    expect(result.warnings).toHaveLength(2);
    expect(result.warnings.join(' ')).toMatch(/internal-conversion time of 20 ns/);
  });
});
