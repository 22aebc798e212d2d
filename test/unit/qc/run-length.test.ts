// Average run lengths (ARL) of the chart rules by seeded simulation, against published values.
// Each estimate is the mean of RUNS independent run lengths; a run length is close to geometric,
// so its SD ≈ ARL and the standard error ≈ ARL/√RUNS ≈ 3.2 % at RUNS = 1000. The ±10 % tolerance is
// therefore ≈ 3 standard errors.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, type SeededRandom } from '../../../src/qc/index.js';
import { CUSUM_START, cusumStep } from '../../../src/qc/rule-kinds/cusum.js';
import { EWMA_START, ewmaLimitHalfWidth, ewmaStep } from '../../../src/qc/rule-kinds/ewma.js';
import { westgardViolations } from '../../../src/qc/rule-kinds/westgard.js';

const RUNS = 1000;
const MAX_RUN_LENGTH = 100_000;

/** Mean run length over RUNS seeded runs of a chart that signals when `step` returns true. */
function averageRunLength(seed: number, makeChart: () => (z: number) => boolean, shiftSd = 0): number {
  const random: SeededRandom = createSeededRandom(seed);
  let total = 0;
  for (let run = 0; run < RUNS; run++) {
    const signals = makeChart();
    let length = 1;
    while (!signals(random.standardNormal() + shiftSd) && length < MAX_RUN_LENGTH) length++;
    total += length;
  }
  return total / RUNS;
}

const cusumChart = (k: number, h: number) => () => {
  let state = CUSUM_START;
  return (z: number): boolean => {
    state = cusumStep(state, z, k);
    return state.upper > h || state.lower > h;
  };
};

const ewmaChart = (lambda: number, limitWidth: number) => () => {
  let state = EWMA_START;
  return (z: number): boolean => {
    state = ewmaStep(state, z, lambda);
    return Math.abs(state.statistic) > ewmaLimitHalfWidth(state.step, lambda, limitWidth);
  };
};

const shewhartChart =
  () =>
  (z: number): boolean =>
    westgardViolations([z], [], { checks: ['1-3s'], rangeScope: 'consecutive', warningGate: false }).length > 0;

describe('run lengths (seeded simulation, 1000 runs each, SE ≈ 3.2 %, tolerance ±10 %)', () => {
  it('Shewhart 3σ (Westgard 1-3s alone): in-control ARL ≈ 370.4 (computed: 1/0.0027)', () => {
    const expected = 1 / (2 * 0.0013499); // two-sided tail beyond 3σ of N(0,1): 0.0026998 (computed)
    expect(averageRunLength(11, shewhartChart)).toBeGreaterThan(expected * 0.9);
    expect(averageRunLength(11, shewhartChart)).toBeLessThan(expected * 1.1);
  });

  // Tabular CUSUM ARLs: Montgomery, Introduction to Statistical Quality Control (from memory);
  // confirmed by us with a Brook–Evans Markov chain (400 states): 167.7 / 8.38 (h = 4), 465.4 / 10.38 (h = 5).
  const cusumTable = [
    { h: 4, shiftSd: 0, arl: 168 },
    { h: 4, shiftSd: 1, arl: 8.38 },
    { h: 5, shiftSd: 0, arl: 465 },
    { h: 5, shiftSd: 1, arl: 10.4 },
  ];
  for (const row of cusumTable) {
    it(`CUSUM k = 0.5, h = ${row.h}, shift ${row.shiftSd}σ: ARL ≈ ${row.arl} (Montgomery, from memory)`, () => {
      const estimate = averageRunLength(100 + row.h * 10 + row.shiftSd, cusumChart(0.5, row.h), row.shiftSd);
      expect(estimate).toBeGreaterThan(row.arl * 0.9);
      expect(estimate).toBeLessThan(row.arl * 1.1);
    });
  }

  it('EWMA λ = 0.2, L = 2.962: in-control ARL ≈ 500 (Lucas & Saccucci 1990, from memory)', () => {
    // Our Markov chain (asymptotic limits, 401 states) gives 499.7 at L = 2.962; with the exact
    // time-varying limits a 20 000-run numpy simulation gives 496 ± 3.5.
    const estimate = averageRunLength(7, ewmaChart(0.2, 2.962));
    expect(estimate).toBeGreaterThan(450);
    expect(estimate).toBeLessThan(550);
  });

  it('EWMA λ = 0.2, L = 2.86 is the ARL ≈ 370 design, not 500 (our Markov chain: 371)', () => {
    const estimate = averageRunLength(8, ewmaChart(0.2, 2.86));
    expect(estimate).toBeGreaterThan(370 * 0.9);
    expect(estimate).toBeLessThan(370 * 1.1);
  });

  it('EWMA λ = 0.2, L = 2.962 detects a 1σ shift in ≈ 10 runs (Lucas & Saccucci: 10.5 asymptotic limits, from memory)', () => {
    // Exact limits start narrow, so the zero-state ARL is lower: numpy simulation 9.59 ± 0.05.
    const estimate = averageRunLength(9, ewmaChart(0.2, 2.962), 1);
    expect(estimate).toBeGreaterThan(9.59 * 0.9);
    expect(estimate).toBeLessThan(9.59 * 1.1);
  });
});
