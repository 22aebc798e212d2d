// Issue 18.3: which measurement of a file holding several a control judges. A control judges the column
// its `match.measurement` names, else the file's first; every other measurement's result is told it was
// not judged and why (qc.judgement), never skipped silently.
import { describe, expect, it } from 'vitest';
import type { AnalysisResult, ResultMeasurement } from '../../../src/analysis/result.js';
import { judgeResult, parseRuleSet } from '../../../src/qc/index.js';

const base = {
  schema: 'driftlight.result/1',
  setId: 'CTRL-pol-0301-abc',
  role: 'control',
  sampleId: 'CTRL-pol-0301',
  acquiredAt: '2026-03-01T08:00:00Z',
  partial: false,
  missing: [],
  spectra: {},
  corrections: [],
  decayFit: {
    components: [],
    tauMeanIntensityNs: 4.05,
    chi2Reduced: 1.02,
    converged: true,
    acceptable: true,
    estimator: 'ml',
    totalCounts: 1e5,
    irfSource: 'decay-column',
    warnings: [],
  },
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

/** The result of measurement `index` (0-based) of a file holding `parallel` and `perpendicular`. */
function measurementResult(index: 0 | 1): AnalysisResult {
  const column = index === 0 ? 'parallel' : 'perpendicular';
  const measurement: ResultMeasurement = {
    id: `CTRL-pol-0301_decay.csv#${column}`,
    column,
    part: 'decay',
    index,
    of: 2,
    ...(index === 0 ? {} : { setId: base.setId }),
  };
  return { ...base, setId: index === 0 ? base.setId : `${base.setId}.${column}`, measurement };
}

const ruleSet = (controls: string) =>
  parseRuleSet(
    `controls:\n${controls}\nrules:\n  - { id: w, metric: meanLifetimeNs, kind: westgard, severity: critical, checks: [1-3s] }\n`,
    'judged.yaml',
  );

describe('judgeResult (issue 18.3)', () => {
  it('without `measurement`: judges the first measurement and names it; the other says why not', () => {
    const { controls } = ruleSet('  - { id: pol, match: { sampleIdPattern: "^CTRL-pol" } }');
    const first = judgeResult(measurementResult(0), controls);
    expect(first.observation).toMatchObject({ controlId: 'pol', setId: base.setId, measurement: 'parallel' });
    expect(first.judgement).toEqual({
      control: 'pol',
      judged: true,
      measurement: 'parallel',
      selectedBy: 'first',
      metrics: ['meanLifetimeNs', 'fitChi2Reduced'],
    });
    const second = judgeResult(measurementResult(1), controls);
    expect(second.observation).toBeUndefined();
    expect(second.judgement).toMatchObject({
      control: 'pol',
      judged: false,
      measurement: 'perpendicular',
      selectedBy: 'first',
    });
    expect(second.judgement?.reason).toContain('control pol judges the first measurement');
    expect(second.judgement?.reason).toContain(`"perpendicular", 2 of 2`);
    expect(second.judgement?.reason).toContain(`the file's first is result ${base.setId}`);
  });

  it('with `measurement`: judges the named column only, whatever its position', () => {
    const { controls } = ruleSet(
      '  - { id: pol, match: { sampleIdPattern: "^CTRL-pol", measurement: perpendicular } }',
    );
    expect(judgeResult(measurementResult(1), controls).judgement).toMatchObject({
      control: 'pol',
      judged: true,
      measurement: 'perpendicular',
      selectedBy: 'config',
      judgedMeasurement: 'perpendicular',
    });
    const first = judgeResult(measurementResult(0), controls);
    expect(first.observation).toBeUndefined();
    expect(first.judgement?.judged).toBe(false);
    expect(first.judgement?.reason).toContain('control pol judges measurement "perpendicular" (its config names it)');
  });

  it('two controls with one pattern judge one column each, as two series', () => {
    const { controls } = ruleSet(
      [
        '  - { id: pol-par, match: { sampleIdPattern: "^CTRL-pol", measurement: parallel } }',
        '  - { id: pol-perp, match: { sampleIdPattern: "^CTRL-pol", measurement: perpendicular } }',
      ].join('\n'),
    );
    expect(judgeResult(measurementResult(0), controls).observation?.controlId).toBe('pol-par');
    expect(judgeResult(measurementResult(1), controls).observation?.controlId).toBe('pol-perp');
  });

  it('a named column and a file holding one measurement: not judged, with the reason', () => {
    const { controls } = ruleSet('  - { id: pol, match: { sampleIdPattern: "^CTRL-pol", measurement: parallel } }');
    const single = judgeResult(base, controls);
    expect(single.observation).toBeUndefined();
    expect(single.judgement?.reason).toContain('holds one measurement');
    // Without a named column a single measurement is judged as before.
    const { controls: plain } = ruleSet('  - { id: pol, match: { sampleIdPattern: "^CTRL-pol" } }');
    expect(judgeResult(base, plain).judgement).toMatchObject({ judged: true, selectedBy: 'first' });
    expect(judgeResult(base, plain).judgement?.measurement).toBeUndefined();
  });

  it('a control result with no metric is reported not judged; a sample gets no judgement', () => {
    const { controls } = ruleSet('  - { id: pol, match: { sampleIdPattern: "^CTRL-pol" } }');
    const { decayFit: _fit, ...withoutFit } = base;
    expect(judgeResult(withoutFit, controls).judgement).toMatchObject({ judged: false });
    expect(judgeResult(withoutFit, controls).judgement?.reason).toContain('no QC metric');
    expect(judgeResult({ ...base, sampleId: 'dye-07', role: 'sample' }, controls)).toEqual({});
  });

  it('instrument checks judge a file’s first measurement and name the others', () => {
    const raman = { ...measurementResult(1), role: 'raman' as const, sampleId: 'water' };
    const judged = judgeResult(raman, []);
    expect(judged.observation).toBeUndefined();
    expect(judged.judgement).toMatchObject({ control: 'instrument', judged: false });
  });
});
