// fitDecay against scipy: the same simulated decays (decays.json) fitted with the same channel-integrated
// reconvolution model and Poisson deviance by scipy.optimize.least_squares (reference.json), both written by
// test/reference/decay/make_reference.py (regenerate: python3 test/reference/decay/make_reference.py).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitDecay } from '../../../src/decay/index.js';
import { createDecay } from '../../../src/model/index.js';

interface ReferenceDecay {
  name: string;
  channelWidthNs: number;
  counts: number[];
  irfCounts: number[];
  rangeNs: [number, number];
  components: 1 | 2;
  periodNs: number | null;
  irfWithinChannel: 'flat' | 'second-order';
}
interface ReferenceFit {
  name: string;
  tauNs: number[];
  amplitudes: number[];
  shiftNs: number;
  backgroundPerChannel: number;
  deviance: number;
  success: boolean;
}

const here = new URL('.', import.meta.url);
const decays = (JSON.parse(readFileSync(new URL('decays.json', here), 'utf8')) as { decays: ReferenceDecay[] }).decays;
const references = (JSON.parse(readFileSync(new URL('reference.json', here), 'utf8')) as { cases: ReferenceFit[] })
  .cases;

describe('fitDecay agrees with scipy.optimize.least_squares on the Poisson deviance', () => {
  it.each(decays.map((decay) => [decay.name, decay] as const))('%s', (_name, input) => {
    const reference = references.find((candidate) => candidate.name === input.name);
    expect(reference).toBeDefined();
    if (reference === undefined) return;
    const decay = createDecay({
      timeNs: input.counts.map((_value, k) => k * input.channelWidthNs),
      counts: input.counts,
      channelWidthNs: input.channelWidthNs,
      irfCounts: input.irfCounts,
    });
    const fit = fitDecay(decay, {
      components: input.components,
      rangeNs: input.rangeNs,
      profileIntervals: false,
      ...(input.periodNs === null ? {} : { repetitionRateHz: 1e9 / input.periodNs }),
      irfWithinChannel: input.irfWithinChannel,
    });
    expect(fit.converged).toBe(true);
    expect(reference.success).toBe(true);
    // Same minimum: lifetimes within 0.1 % relative (the acceptance criterion), deviance equal to 1e-4.
    const scipyTaus = [...reference.tauNs].sort((a, b) => a - b);
    fit.components.forEach((component, index) => {
      expect(Math.abs(component.tauNs / (scipyTaus[index] ?? Number.NaN) - 1)).toBeLessThan(1e-3);
    });
    expect(fit.deviance).toBeLessThanOrEqual(reference.deviance + 1e-4);
    expect(Math.abs(fit.deviance - reference.deviance)).toBeLessThan(1e-3);
    expect(fit.shiftNs).toBeCloseTo(reference.shiftNs, 3);
    expect(fit.backgroundPerChannel).toBeCloseTo(reference.backgroundPerChannel, 2);
  });
});
