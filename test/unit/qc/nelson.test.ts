// Nelson run rules 1–8 on constructed sequences: each fires on its defining pattern and not on a near
// miss. Definitions: Nelson, J. Qual. Technol. 16, 237 (1984).
import { describe, expect, it } from 'vitest';
import { nelsonViolations, NELSON_TESTS, type NelsonTest } from '../../../src/qc/rule-kinds/nelson.js';

const repeat = (value: number, count: number): number[] => Array.from({ length: count }, () => value);
const alternating = (count: number, start = 0.5): number[] =>
  Array.from({ length: count }, (_, i) => (i % 2 === 0 ? start : -start));

describe('Nelson rules (Nelson, J. Qual. Technol. 16, 1984)', () => {
  const table: { test: NelsonTest; pattern: number[]; nearMiss: number[] }[] = [
    { test: 1, pattern: [0, 3.1], nearMiss: [0, 2.99] },
    // 2: nine in a row on one side; near miss: eight.
    { test: 2, pattern: [-0.3, ...repeat(0.4, 9)], nearMiss: [-0.3, ...repeat(0.4, 8)] },
    // 3: six in a row steadily increasing; near miss: a tie breaks the run.
    { test: 3, pattern: [0.5, -0.5, -0.4, -0.2, 0, 0.1, 0.3], nearMiss: [0.5, -0.5, -0.4, -0.2, -0.2, 0.1, 0.3] },
    // 4: fourteen alternating up and down; near miss: thirteen (0.6 → 0.5 → −0.5 is down, down).
    { test: 4, pattern: [0.2, 0.2, ...alternating(14)], nearMiss: [0.6, 0.6, ...alternating(13)] },
    // 5: two of three beyond 2σ on the same side; near miss: the other one is beyond −2σ.
    { test: 5, pattern: [0, 2.2, 0.5, 2.1], nearMiss: [0, -2.2, 0.5, 2.1] },
    // 6: four of five beyond 1σ on the same side; near miss: only three of five.
    { test: 6, pattern: [0, 1.2, 0.3, 1.4, 1.1, 1.2], nearMiss: [0, 1.2, 0.3, 0.9, 1.1, 1.2] },
    // 7: fifteen within 1σ; near miss: one of the fifteen at 1.05.
    {
      test: 7,
      pattern: [1.5, ...alternating(15, 0.3).map((v, i) => v * (i % 3 === 0 ? 1 : 2))],
      nearMiss: [1.5, ...repeat(0.3, 7), 1.05, ...repeat(-0.3, 7)],
    },
    // 8: eight beyond 1σ on both sides, none within 1σ; near miss: one of them at 0.9.
    {
      test: 8,
      pattern: [0, 1.5, -1.5, 1.2, 1.3, -1.8, -1.1, 1.4, -1.6],
      nearMiss: [0, 1.5, -1.5, 1.2, 0.9, -1.8, -1.1, 1.4, -1.6],
    },
  ];

  for (const row of table) {
    it(`test ${row.test} fires on its defining pattern`, () => {
      expect(nelsonViolations(row.pattern, [row.test])).toEqual([row.test]);
    });
    it(`test ${row.test} does not fire on a near miss`, () => {
      expect(nelsonViolations(row.nearMiss, [row.test])).toEqual([]);
    });
  }

  it('test 8 needs points on both sides (eight beyond +1σ is tests 2/6 territory, not 8)', () => {
    expect(nelsonViolations(repeat(1.5, 8), [8])).toEqual([]);
  });

  it('test 4 fails when one step is flat', () => {
    const pattern = alternating(14);
    pattern[7] = pattern[6] ?? 0;
    expect(nelsonViolations(pattern, [4])).toEqual([]);
  });

  it('an all-tests evaluation of an in-control sequence flags nothing', () => {
    const calm = [0.3, -0.8, 1.2, 0.1, -0.4, 0.9, -1.3, 0.2];
    expect(nelsonViolations(calm, NELSON_TESTS)).toEqual([]);
  });
});
