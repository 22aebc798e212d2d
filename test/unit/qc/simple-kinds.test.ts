// Tolerance, percent change against a rolling median, instrument-health thresholds and
// control-missing (local time through Intl) on hand-made sequences.
import { describe, expect, it } from 'vitest';
import { evaluateClockRules, evaluateRules, type ControlObservation } from '../../../src/qc/index.js';
import { lastOf, ruleSetWith } from './qc-fixtures.js';

const obs = (day: number, metrics: ControlObservation['metrics'], controlId = 'flu'): ControlObservation => ({
  controlId,
  setId: `s${day}`,
  acquiredAt: `2026-03-${String(2 + day).padStart(2, '0')}T08:00:00Z`,
  metrics,
});

describe('absolute tolerance', () => {
  const ruleSet = ruleSetWith(`
  - { id: abs, metric: absorbanceAtExcitation, scope: { control: flu }, kind: tolerance, severity: warning, max: 0.1 }
  - { id: y, metric: controlQuantumYield, scope: { control: flu }, kind: tolerance, severity: critical, target: 0.925, plusMinus: 0.03 }
`);
  it('flags values outside and passes values on the edge', () => {
    const inside = evaluateRules({
      history: [],
      observation: obs(0, { absorbanceAtExcitation: 0.1, controlQuantumYield: 0.955 }),
      ruleSet,
    });
    expect(inside).toEqual([]);
    const outside = evaluateRules({
      history: [],
      observation: obs(0, { absorbanceAtExcitation: 0.12, controlQuantumYield: 0.89 }),
      ruleSet,
    });
    expect(outside.map((flag) => flag.message)).toEqual([
      'absorbance at excitation 0.1200 is outside the tolerance (at most 0.1000).',
      'control yield 0.890 is outside the tolerance (0.925 ± 0.030).',
    ]);
  });
});

describe('percent change against a rolling median', () => {
  const ruleSet = ruleSetWith(`
  - { id: pc, metric: intensityPerAbsorbedLight, scope: { control: flu }, kind: percent-change, severity: warning, maxPercent: 10, windowRuns: 3, minRuns: 2 }
`);
  it('compares with the median of the preceding window, robust to one outlier', () => {
    // Preceding window (last 3): 100, 500 (outlier), 102 → median 102; 113 is +10.8 % → flag.
    const series = [90, 100, 500, 102, 113].map((value, day) => obs(day, { intensityPerAbsorbedLight: value }));
    const { history, latest } = lastOf(series);
    const flags = evaluateRules({ history, observation: latest, ruleSet });
    expect(flags).toHaveLength(1);
    expect(flags[0]?.values['median']).toBe(102);
    expect(flags[0]?.values['changePercent']).toBeCloseTo(10.784, 2);
    // 112 is +9.8 % → no flag.
    const calm = evaluateRules({
      history,
      observation: { ...latest, metrics: { intensityPerAbsorbedLight: 112 } },
      ruleSet,
    });
    expect(calm).toEqual([]);
  });
  it('waits for minRuns preceding runs', () => {
    const { history, latest } = lastOf([
      obs(0, { intensityPerAbsorbedLight: 100 }),
      obs(1, { intensityPerAbsorbedLight: 200 }),
    ]);
    expect(evaluateRules({ history, observation: latest, ruleSet })).toEqual([]);
  });
});

describe('instrument health', () => {
  const ruleSet = ruleSetWith(`
  - { id: chi, metric: fitChi2Reduced, scope: instrument, kind: instrument-health, severity: warning, above: 1.3, consecutiveRuns: 3 }
  - { id: snr, metric: ramanSnr, scope: instrument, kind: instrument-health, severity: critical, below: 300 }
`);
  it('fires only after N breaching runs in a row, from any source', () => {
    const runs = [
      obs(0, { fitChi2Reduced: 1.5 }),
      obs(1, { fitChi2Reduced: 1.4 }, 'instrument'),
      obs(2, { fitChi2Reduced: 1.6 }),
    ];
    const two = lastOf(runs.slice(0, 2));
    expect(evaluateRules({ history: two.history, observation: two.latest, ruleSet })).toEqual([]);
    const three = lastOf(runs);
    const flags = evaluateRules({ history: three.history, observation: three.latest, ruleSet });
    expect(flags.map((flag) => [flag.ruleId, flag.controlId])).toEqual([['chi', 'instrument']]);
    expect(flags[0]?.message).toBe('fit reduced chi-square 1.60 is above the limit 1.30 for 3 runs in a row.');
  });
  it('a low Raman SNR is flagged critical', () => {
    const flags = evaluateRules({ history: [], observation: obs(0, { ramanSnr: 250 }, 'instrument'), ruleSet });
    expect(flags.map((flag) => flag.severity)).toEqual(['critical']);
  });
});

describe('control missing (local time via Intl)', () => {
  const ruleSet = ruleSetWith(`
  - { id: missing, metric: controlQuantumYield, scope: { control: flu }, kind: control-missing, severity: warning, dueBy: "10:00" }
`);
  // 2026-03-02 is a Monday. Europe/Berlin is UTC+1 in March before the 29th (EU rule: last Sunday of March).
  const monday0930Berlin = '2026-03-02T08:30:00Z';
  const monday1015Berlin = '2026-03-02T09:15:00Z';
  it('is quiet before the due time and flags after it when no control arrived that local day', () => {
    expect(evaluateClockRules({ history: [], ruleSet, now: monday0930Berlin })).toEqual([]);
    const flags = evaluateClockRules({ history: [], ruleSet, now: monday1015Berlin });
    expect(flags.map((flag) => flag.message)).toEqual([
      'No flu control result (control yield) by 10:00 (Europe/Berlin) on 2026-03-02.',
    ]);
    expect(flags[0]?.values['minutesOverdue']).toBe(15);
  });
  it('a control earlier that local day satisfies it; one from the previous local day does not', () => {
    const sameDay = {
      controlId: 'flu',
      setId: 'a',
      acquiredAt: '2026-03-01T23:30:00Z',
      metrics: { controlQuantumYield: 0.92 },
    }; // 00:30 Monday in Berlin
    expect(evaluateClockRules({ history: [sameDay], ruleSet, now: monday1015Berlin })).toEqual([]);
    const previousDay = { ...sameDay, acquiredAt: '2026-03-01T22:30:00Z' }; // 23:30 Sunday in Berlin
    expect(evaluateClockRules({ history: [previousDay], ruleSet, now: monday1015Berlin })).toHaveLength(1);
  });
  it('the zone passed in overrides the rule set default; weekends are not scheduled', () => {
    // 09:15 UTC is 10:15 in Berlin but only 04:15 in New York (UTC−5 on 2 March).
    expect(evaluateClockRules({ history: [], ruleSet, now: monday1015Berlin, timeZone: 'America/New_York' })).toEqual(
      [],
    );
    expect(evaluateClockRules({ history: [], ruleSet, now: monday1015Berlin, timeZone: '+01:00' })).toHaveLength(1);
    expect(evaluateClockRules({ history: [], ruleSet, now: '2026-03-01T12:00:00Z' })).toEqual([]); // Sunday
  });
  it('follows daylight saving time (Berlin is UTC+2 after 2026-03-29)', () => {
    // Monday 2026-03-30: 08:15 UTC is 10:15 CEST → overdue; 07:45 UTC is 09:45 → not yet.
    expect(evaluateClockRules({ history: [], ruleSet, now: '2026-03-30T08:15:00Z' })).toHaveLength(1);
    expect(evaluateClockRules({ history: [], ruleSet, now: '2026-03-30T07:45:00Z' })).toEqual([]);
  });
});
