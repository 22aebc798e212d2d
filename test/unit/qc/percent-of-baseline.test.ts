// Issue 16 (follow-up of 16.5): peak position and band width judged against the control's baseline
// (or a declared target), not a rolling median that follows a slow drift. Hand-made sequences; the
// expected percentages are plain arithmetic (|x − mean| / mean × 100), checked by hand.
import { describe, expect, it } from 'vitest';
import { loadRuleSetFile } from '../../../src/pipeline/qc-rule-set.js';
import { evaluateRules, parseRuleSet, replayObservations, type ControlObservation } from '../../../src/qc/index.js';
import { dayIso } from './qc-fixtures.js';

const BASELINE_RUNS = 5;

function ruleSet(against: 'median' | 'baseline', targets = ''): ReturnType<typeof parseRuleSet> {
  return parseRuleSet(
    `
version: 1
controls:
  - id: flu
    match: { sampleId: "CTRL-FLU*" }
    baselineRuns: ${BASELINE_RUNS}
${targets}
rules:
  - { id: peak-shift, metric: peakWavelengthNm, kind: percent-change, severity: warning, maxPercent: 0.5, windowRuns: 7, minRuns: 3, against: ${against} }
`,
    'test.yaml',
  );
}

/** Daily runs of "flu" whose emission peak is `peaks[day]` nm. */
function peakRuns(peaks: readonly number[]): ControlObservation[] {
  return peaks.map((peakWavelengthNm, day) => ({
    controlId: 'flu',
    setId: `set-${String(day).padStart(2, '0')}`,
    acquiredAt: dayIso(day),
    metrics: { peakWavelengthNm },
  }));
}

// A monochromator whose calibration creeps by 0.5 nm a day after 5 steady days at 515 nm (a 0.5 nm
// grid: the peak is read on the grid, so the baseline SD is 0 and only the mean can be used).
const creeping = [515, 515, 515, 515, 515, ...Array.from({ length: 14 }, (_u, day) => 515.5 + 0.5 * day)];

describe('percent change against the baseline (against: baseline)', () => {
  it('sees a slow creep that a rolling median follows', () => {
    const median = replayObservations(peakRuns(creeping), ruleSet('median'));
    // The median of the 7 preceding runs of a 0.5 nm/day ramp lags it by at most 2 nm (0.39 % < 0.5 %):
    // the creep of 7 nm (1.4 %) is never seen. This is the weakness the baseline reference removes.
    const medianFlagged = median.steps.filter((step) => step.flags.length > 0).length;
    expect(medianFlagged).toBe(0);
    const baseline = replayObservations(peakRuns(creeping), ruleSet('baseline'));
    const flaggedDays = baseline.steps.flatMap((step, day) => (step.flags.length > 0 ? [day] : []));
    // Baseline mean 515 nm (the first 5 runs, SD 0). 0.5 % of 515 nm is 2.575 nm: 517.5 nm (day 9,
    // +0.49 %) passes, 518 nm (day 10, +0.58 %) is the first beyond it, and every later day stays flagged.
    expect(flaggedDays).toEqual([10, 11, 12, 13, 14, 15, 16, 17, 18]);
    const first = baseline.steps[10]?.flags[0];
    expect(first?.values['mean']).toBe(515);
    expect(first?.values['changePercent']).toBeCloseTo((3 / 515) * 100, 10);
    expect(first?.message).toBe('emission peak 518.0 nm is 0.6 % above the baseline 515.0 nm (limit 0.5 %).');
  });

  it('is silent while the baseline is collected and judges against a declared target at once', () => {
    const collecting = replayObservations(peakRuns([515, 530, 515]), ruleSet('baseline'));
    expect(collecting.steps.flatMap((step) => step.flags)).toEqual([]);
    const declared = ruleSet('baseline', '    targets:\n      peakWavelengthNm: { mean: 520, sd: 0.5 }');
    const flags = evaluateRules({
      history: [],
      observation: peakRuns([515])[0] as ControlObservation,
      ruleSet: declared,
    });
    // |515 − 520| / 520 = 0.96 % > 0.5 % → flagged against the declared target.
    expect(flags.map((flag) => [flag.values['mean'], Number(flag.values['changePercent']?.toFixed(3))])).toEqual([
      [520, -0.962],
    ]);
  });

  it('a step is not "recovered" while the level is still off', () => {
    // Step from 515 to 519 nm that stays: every run after it is flagged, no recovery notice.
    const stepped = replayObservations(
      peakRuns([515, 515, 515, 515, 515, 519, 519, 519, 519, 519, 519, 519, 519]),
      ruleSet('baseline'),
    );
    expect(stepped.steps.slice(5).every((step) => step.flags.length === 1)).toBe(true);
    expect(stepped.steps.flatMap((step) => step.recoveries)).toEqual([]);
  });

  it('the shipped rule set judges the peak and the band width against the baseline', () => {
    const shipped = loadRuleSetFile();
    const kinds = shipped.rules.filter((rule) => rule.metric === 'peakWavelengthNm' || rule.metric === 'fwhmNm');
    expect(kinds.map((rule) => [rule.id, rule.kind === 'percent-change' ? rule.against : rule.kind])).toEqual([
      ['peak-shift', 'baseline'],
      ['fwhm-change', 'baseline'],
    ]);
  });
});
