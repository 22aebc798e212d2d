// The fit objective: Σ r² is the same number with or without derivatives (the minimiser compares values
// from both paths), and the Fisher information and fitted counts reused from the last evaluation equal
// freshly computed ones.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, gaussianIrf, simulateDecay } from '../../../src/decay/index.js';
import { startSource } from '../../../src/decay/component-fit.js';
import { resolveFitDecayOptions } from '../../../src/decay/options.js';
import { prepareDecay } from '../../../src/decay/prepare-decay.js';

const channels = 512;
const widthNs = 25 / channels;
const decay = simulateDecay(
  {
    channels,
    channelWidthNs: widthNs,
    tauNs: [0.7, 3.5],
    intensityFractions: [0.4, 0.6],
    photons: 2e4,
    irf: gaussianIrf(channels, widthNs, 2, 0.2),
    backgroundPerChannel: 0.5,
    shiftNs: 0.01,
  },
  createSeededRandom(31),
);

function problemFor(estimator: 'ml' | 'lsq-neyman' | 'lsq-pearson') {
  const options = resolveFitDecayOptions({ components: 2, estimator, profileIntervals: false });
  const prepared = prepareDecay(decay, options, 8);
  const source = startSource([prepared], 2, options, [], true);
  const start = source.nextStart();
  if (start === undefined) throw new Error('no start');
  return { problem: source.problem, start, size: source.layout.labels.length };
}

describe('FitProblem', () => {
  it.each(['ml', 'lsq-neyman', 'lsq-pearson'] as const)(
    'returns the same Σ r² with and without derivatives (%s), bit for bit',
    (estimator) => {
      const { problem, start, size } = problemFor(estimator);
      const normal = new Float64Array(size * size);
      const gradient = new Float64Array(size);
      for (const factor of [1, 1.01, 0.97]) {
        const parameters = Float64Array.from(start, (value) => value * factor);
        const withDerivatives = problem.evaluate(parameters, true, normal, gradient);
        expect(problem.evaluate(parameters, false, normal, gradient)).toBe(withDerivatives);
      }
    },
  );

  it('reuses the last evaluation for the information and the fitted counts only at the same parameters', () => {
    const { problem, start, size } = problemFor('ml');
    const fresh = problemFor('ml').problem;
    const moved = Float64Array.from(start, (value) => value * 1.02);
    const normal = new Float64Array(size * size);
    const gradient = new Float64Array(size);
    problem.evaluate(moved, true, normal, gradient);
    expect(Array.from(problem.information(start))).toEqual(Array.from(fresh.information(start)));
    problem.evaluate(start, true, normal, gradient);
    expect(Array.from(problem.modelOf(0, start))).toEqual(Array.from(fresh.modelOf(0, start)));
    problem.evaluate(moved, false, normal, gradient);
    expect(Array.from(problem.modelOf(0, start))).toEqual(Array.from(fresh.modelOf(0, start)));
    expect(Array.from(problem.information(moved))).toEqual(Array.from(fresh.information(moved)));
  });
});
