// Baselines (declared, stored, first-N runs after a rebaseline date), recovery notices, the
// result → observation reduction and the acquisition-order replay.
import { describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../../src/analysis/result.js';
import {
  detectRecoveries,
  establishBaseline,
  evaluateRules,
  observationFromResult,
  parseRuleSet,
  replayObservations,
  type ControlObservation,
} from '../../../src/qc/index.js';
import { expectedWaterRamanPeakNm } from '../../../src/qc/observation.js';
import { dayIso, lastOf, ruleSetWith, yieldObservations } from './qc-fixtures.js';

const firstNRuleSet = parseRuleSet(
  `
controls:
  - id: flu
    match: { sampleId: "CTRL-FLU*", role: control }
    baselineRuns: 5
rules:
  - { id: w, metric: controlQuantumYield, scope: { control: flu }, kind: westgard, severity: critical, checks: [1-3s] }
`,
  'first-n.yaml',
);

const yields = (values: readonly number[], startDay = 0): ControlObservation[] =>
  values.map((value, i) => ({
    controlId: 'flu',
    setId: `s${startDay + i}`,
    acquiredAt: dayIso(startDay + i),
    metrics: { controlQuantumYield: value },
  }));

describe('baselines', () => {
  it('mean and sample SD of the baseline runs (hand computation)', () => {
    // 0.90, 0.92, 0.94: mean 0.92, SD √((0.0004+0+0.0004)/2) = 0.02
    const baseline = establishBaseline([0.9, 0.92, 0.94], 3);
    expect(baseline?.mean).toBeCloseTo(0.92, 12);
    expect(baseline?.sd).toBeCloseTo(0.02, 12);
  });

  it('leaves out runs beyond 3 SD of the provisional mean (Levey–Jennings practice)', () => {
    const values = [...Array.from({ length: 19 }, (_, i) => 1 + (i % 2 === 0 ? 0.01 : -0.01)), 1.5];
    const baseline = establishBaseline(values, 3);
    expect(baseline?.runs).toBe(19);
    expect(baseline?.mean).toBeCloseTo(1 + 0.01 / 19, 10);
  });

  it('charts judge nothing until N runs exist, then judge the runs after them', () => {
    const runs = yields([0.92, 0.93, 0.91, 0.92, 0.93, 0.92]);
    for (let i = 1; i <= 5; i++) {
      const { history, latest } = lastOf(runs.slice(0, i));
      expect(
        evaluateRules({
          history,
          observation: { ...latest, metrics: { controlQuantumYield: 0.5 } },
          ruleSet: firstNRuleSet,
        }),
      ).toEqual([]);
    }
    const { history, latest } = lastOf([...runs.slice(0, 5), ...yields([0.85], 5)]);
    const flags = evaluateRules({ history, observation: latest, ruleSet: firstNRuleSet });
    expect(flags.map((flag) => flag.check)).toEqual(['1-3s']);
    expect(flags[0]?.message).toMatch(/below baseline mean 0\.922 \(1-3s\)\.$/);
  });

  it('a rebaseline record restarts the baseline at its date; a stored one is used as is', () => {
    const old = yields([0.92, 0.93, 0.91, 0.92, 0.93]);
    const shifted = yields([0.85, 0.86, 0.84, 0.85, 0.86], 5);
    const { history, latest } = lastOf([...old, ...shifted, ...yields([0.855], 10)]);
    // Without a rebaseline, 0.855 is far below the old mean.
    expect(evaluateRules({ history, observation: latest, ruleSet: firstNRuleSet })).toHaveLength(1);
    const restartRecord = { controlId: 'flu', metric: 'controlQuantumYield' as const, fromIso: dayIso(5) };
    const restart = [restartRecord];
    expect(evaluateRules({ history, observation: latest, ruleSet: firstNRuleSet, baselines: restart })).toEqual([]);
    const stored = [{ ...restartRecord, fromIso: dayIso(5), mean: 0.92, sd: 0.01, runs: 20, throughIso: dayIso(9) }];
    expect(
      evaluateRules({ history, observation: latest, ruleSet: firstNRuleSet, baselines: stored }).map(
        (f) => f.values['mean'],
      ),
    ).toEqual([0.92]);
  });
});

describe('recovery', () => {
  const ruleSet = ruleSetWith(`
  - { id: w, metric: controlQuantumYield, scope: { control: flu }, kind: westgard, severity: critical, checks: [1-3s] }
`);
  it('reports a flagged rule + control + metric as back in control on the next clean run', () => {
    const runs = yieldObservations([0, -3.5, -0.2, 0.1]);
    const outcome = replayObservations(runs, ruleSet);
    expect(outcome.steps.map((step) => step.flags.length)).toEqual([0, 1, 0, 0]);
    expect(outcome.steps.map((step) => step.recoveries.length)).toEqual([0, 0, 1, 0]);
    expect(outcome.steps[2]?.recoveries[0]?.message).toBe(
      'control yield 0.923 is back in control for control flu (rule w no longer fires).',
    );
  });
  it('does not recover on a run without the metric or of another control', () => {
    const flagged = evaluateRules({
      history: [],
      observation: yieldObservations([-3.5])[0] as ControlObservation,
      ruleSet,
    });
    const other: ControlObservation = {
      controlId: 'other',
      setId: 'x',
      acquiredAt: dayIso(1),
      metrics: { controlQuantumYield: 0.925 },
    };
    const noMetric: ControlObservation = {
      controlId: 'flu',
      setId: 'y',
      acquiredAt: dayIso(1),
      metrics: { fwhmNm: 30 },
    };
    expect(detectRecoveries({ activeFlags: flagged, newFlags: [], observation: other })).toEqual([]);
    expect(detectRecoveries({ activeFlags: flagged, newFlags: [], observation: noMetric })).toEqual([]);
  });
});

describe('observationFromResult', () => {
  const result = {
    schema: 'driftlight.result/1',
    setId: 'set-1',
    role: 'control',
    sampleId: 'CTRL-FLU-0301',
    acquiredAt: '2026-03-01T08:00:00Z',
    excitationNm: 350,
    partial: false,
    missing: [],
    spectra: {
      emission: {
        peakWavelengthNm: 515,
        peakValue: 1,
        integratedIntensity: 2000,
        fwhmNm: 36,
        valueUnit: 'a.u.',
        rangeNm: [480, 650],
      },
      absorbance: { absorbanceAtExcitation: 0.05, excitationNm: 490, peakWavelengthNm: 490, peakAbsorbance: 0.05 },
    },
    corrections: [],
    decayFit: {
      components: [],
      tauMeanIntensityNs: 4.05,
      chi2Reduced: 1.07,
      converged: true,
      estimator: 'ml',
      totalCounts: 1e5,
      irfSource: 'irf-file',
      warnings: [],
    },
    quantumYield: { value: 0.92, standardUncertainty: 0.02, budget: [], standardId: 'x', warnings: [] },
    raman: { peakWavelengthNm: 397.8, signalToNoise: 1200 },
    warnings: [],
    qc: { flags: [] },
    provenance: {
      inputs: [],
      configHash: 'h',
      softwareVersion: '0',
      corrections: [],
      analyzedAt: '2026-03-01T09:00:00Z',
    },
  } satisfies AnalysisResult;

  it('maps a control result onto the metrics and the matched control', () => {
    const observation = observationFromResult(result, firstNRuleSet.controls);
    expect(observation?.controlId).toBe('flu');
    expect(observation?.metrics.controlQuantumYield).toBe(0.92);
    expect(observation?.metrics.meanLifetimeNs).toBe(4.05);
    // Absorptance 1 − 10^−0.05 = 0.108749 (Brouwer 2011 form) → 2000 / 0.108749 = 18390.9
    expect(observation?.metrics.intensityPerAbsorbedLight).toBeCloseTo(2000 / (1 - 10 ** -0.05), 6);
    // Water Raman at 350 nm excitation peaks near 397 nm (Bartlett et al., Appl. Opt. 37, 3324, 1998).
    expect(expectedWaterRamanPeakNm(350)).toBeGreaterThan(396);
    expect(expectedWaterRamanPeakNm(350)).toBeLessThan(398);
    expect(observation?.metrics.ramanPeakErrorNm).toBeCloseTo(397.8 - expectedWaterRamanPeakNm(350), 10);
  });

  it('gives undefined for a sample that is no control', () => {
    expect(
      observationFromResult({ ...result, role: 'sample', sampleId: 'dye-07' }, firstNRuleSet.controls),
    ).toBeUndefined();
  });
});
