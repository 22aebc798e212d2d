// The matrix exponential (Padé 13, scaling and squaring) against scipy.linalg.expm reference values.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { expm } from '../../../src/photophysics/expm.js';

interface Reference {
  generic: { matrix: number[][]; expm: number[][]; oneNorm: number }[];
}
// Values from scipy 1.17 scipy.linalg.expm: test/reference/photophysics/expm_reference.py (committed JSON).
const reference = JSON.parse(
  readFileSync(new URL('../../reference/photophysics/expm_reference.json', import.meta.url), 'utf8'),
) as Reference;

function toMatrix(rows: number[][]): { size: number; data: Float64Array } {
  return { size: rows.length, data: Float64Array.from(rows.flat()) };
}

describe('expm', () => {
  it.each(reference.generic.map((g) => [g.oneNorm.toFixed(3), g] as const))(
    'matches scipy.linalg.expm for ‖A‖₁ = %s',
    (_norm, g) => {
      const result = expm(toMatrix(g.matrix));
      const expected = g.expm.flat();
      const scale = Math.max(...expected.map(Math.abs));
      expected.forEach((value, i) => expect(Math.abs((result.data[i] as number) - value)).toBeLessThan(1e-11 * scale));
    },
  );

  it('gives e^a on a diagonal matrix and the identity for zero', () => {
    // exp of a diagonal matrix is the diagonal of exponentials (definition of the power series).
    const diagonal = expm({ size: 2, data: Float64Array.from([-30, 0, 0, 2]) });
    expect(diagonal.data[0]).toBeCloseTo(Math.exp(-30), 24);
    expect((diagonal.data[3] as number) / Math.exp(2)).toBeCloseTo(1, 13);
    expect(Array.from(expm({ size: 2, data: new Float64Array(4) }).data)).toEqual([1, 0, 0, 1]);
  });
});
