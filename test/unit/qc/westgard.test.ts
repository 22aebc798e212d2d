// Westgard multirule on constructed sequences: each check fires on its defining pattern and not on
// near misses. Definitions: Westgard, Barry, Hunt & Groth, Clin. Chem. 27, 493 (1981).
import { describe, expect, it } from 'vitest';
import { evaluateRules } from '../../../src/qc/index.js';
import { westgardViolations, WESTGARD_CHECKS } from '../../../src/qc/rule-kinds/westgard.js';
import { lastOf, ruleSetWith, yieldObservations } from './qc-fixtures.js';

const ALL = { checks: WESTGARD_CHECKS, rangeScope: 'consecutive', warningGate: false } as const;

/** Checks fired on the last z of the sequence (no within-run partners). */
const fired = (z: number[], options = ALL): string[] => westgardViolations(z, [], options);

describe('Westgard multirule (Westgard et al., Clin. Chem. 27, 493, 1981)', () => {
  // Each row: pattern (z-scores, newest last), the check it defines, and a near miss that must not fire it.
  const table: { check: string; pattern: number[]; nearMiss: number[] }[] = [
    { check: '1-2s', pattern: [0.3, 2.2], nearMiss: [0.3, 1.98] },
    { check: '1-3s', pattern: [0.1, -3.2], nearMiss: [0.1, -2.98] },
    // 2-2s: two consecutive beyond the SAME 2s limit; near miss: the earlier one just inside.
    { check: '2-2s', pattern: [0, 2.3, 2.1], nearMiss: [0, 1.95, 2.1] },
    // R-4s: one beyond +2s and one beyond −2s; near miss: range 4.3 s but −1.9 is inside −2s.
    { check: 'R-4s', pattern: [0, 2.4, -2.1], nearMiss: [0, 2.4, -1.9] },
    // 4-1s: four consecutive beyond the same 1s limit; near miss: third point 0.95.
    { check: '4-1s', pattern: [0, 1.2, 1.5, 1.1, 1.3], nearMiss: [0, 1.2, 1.5, 0.95, 1.3] },
    // 10-x: ten consecutive on one side of the mean; near miss: nine, preceded by one below.
    {
      check: '10-x',
      pattern: [-0.5, 0.3, 0.6, 0.2, 0.9, 0.4, 0.1, 0.7, 0.5, 0.3, 0.8],
      nearMiss: [0.3, -0.2, 0.6, 0.2, 0.9, 0.4, 0.1, 0.7, 0.5, 0.3, 0.8],
    },
  ];

  for (const row of table) {
    it(`${row.check} fires on its defining pattern`, () => {
      expect(fired(row.pattern)).toContain(row.check);
    });
    it(`${row.check} does not fire on a near miss`, () => {
      expect(fired(row.nearMiss)).not.toContain(row.check);
    });
  }

  it('2-2s needs both results beyond the same limit (one +2s, one −2s is R-4s, not 2-2s)', () => {
    const checks = fired([0, 2.2, -2.2]);
    expect(checks).not.toContain('2-2s');
    expect(checks).toContain('R-4s');
  });

  it('reports 1-2s only when no rejection check fires', () => {
    expect(fired([0, -3.5])).toEqual(['1-3s']);
    expect(fired([0, 0, -2.5])).toEqual(['1-2s']);
  });

  it('R-4s within-run uses results of the same run only', () => {
    const options = { ...ALL, rangeScope: 'within-run' } as const;
    expect(westgardViolations([0, 2.4, -2.1], [], options)).not.toContain('R-4s');
    expect(westgardViolations([0, -2.1], [2.4], options)).toContain('R-4s');
  });

  it('with warningGate, rejection checks run only after a 1-2s warning (the 1981 flow chart)', () => {
    const gated = { ...ALL, warningGate: true } as const;
    const fourOneS = [0, 1.2, 1.5, 1.1, 1.3];
    expect(westgardViolations(fourOneS, [], gated)).toEqual([]);
    expect(westgardViolations([0, 1.2, 1.5, 1.1, 2.3], [], gated)).toContain('4-1s');
  });

  it('flags through evaluateRules with the technician message and the numbers', () => {
    const ruleSet = ruleSetWith(`
  - id: yield-westgard
    metric: controlQuantumYield
    scope: { control: flu }
    kind: westgard
    severity: critical
    rangeScope: consecutive
`);
    // 0.925 − 3.4 × 0.01 = 0.891 → "3.4 SD below target 0.925 (1-3s)"
    const observations = yieldObservations([0.2, -0.1, -3.4]);
    const { history, latest } = lastOf(observations);
    const flags = evaluateRules({ history, observation: latest, ruleSet });
    expect(flags).toHaveLength(1);
    const flag = flags[0];
    expect(flag?.ruleId).toBe('yield-westgard');
    expect(flag?.check).toBe('1-3s');
    expect(flag?.severity).toBe('critical');
    expect(flag?.message).toBe('control yield 0.891 is 3.4 SD below target 0.925 (1-3s).');
    expect(flag?.values['sdUnits']).toBeCloseTo(-3.4, 6);
  });

  it('the 1-2s warning carries warningSeverity', () => {
    const ruleSet = ruleSetWith(`
  - id: w
    metric: controlQuantumYield
    scope: { control: flu }
    kind: westgard
    severity: critical
    warningSeverity: info
`);
    const { history, latest } = lastOf(yieldObservations([0, 2.5]));
    const flags = evaluateRules({ history, observation: latest, ruleSet });
    expect(flags.map((f) => [f.check, f.severity])).toEqual([['1-2s', 'info']]);
  });
});
