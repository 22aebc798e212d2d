// The blocked Gauss–Newton cross products against the plain one-sum-per-entry loops they replace: the
// same numbers bit for bit (every sum runs over the channels in order with the same operations).
import { describe, expect, it } from 'vitest';
import { createSeededRandom } from '../../../src/decay/index.js';
import { weightedCrossProducts } from '../../../src/decay/weighted-cross-products.js';

/** Σ_k (w_k·J_a[k])·J_b[k] and Σ_k J_a[k]·s_k by the definition, one sum at a time. */
function plain(
  jacobian: Float64Array,
  channels: number,
  slots: readonly number[],
  weights: Float64Array,
  slope: Float64Array,
) {
  const count = slots.length;
  const products = new Float64Array(count * count);
  const gradient = new Float64Array(count);
  for (let a = 0; a < count; a++) {
    const offsetA = (slots[a] as number) * channels;
    let dot = 0;
    for (let k = 0; k < channels; k++) dot += (jacobian[offsetA + k] as number) * (slope[k] as number);
    gradient[a] = dot;
    for (let b = a; b < count; b++) {
      const offsetB = (slots[b] as number) * channels;
      let sum = 0;
      for (let k = 0; k < channels; k++)
        sum += (weights[k] as number) * (jacobian[offsetA + k] as number) * (jacobian[offsetB + k] as number);
      products[a * count + b] = sum;
    }
  }
  return { products, gradient };
}

describe('weightedCrossProducts', () => {
  it.each([1, 2, 3, 4, 5, 6, 7, 8, 11])('equals the plain sums exactly for %i columns', (count) => {
    const random = createSeededRandom(100 + count);
    const channels = 37;
    const totalSlots = count + 2;
    const jacobian = Float64Array.from({ length: totalSlots * channels }, () => random.nextUniform() * 4 - 2);
    const weights = Float64Array.from({ length: channels }, () => random.nextUniform());
    const slope = Float64Array.from({ length: channels }, () => random.nextUniform() - 0.5);
    // Every other slot skipped, as fixed parameters are.
    const slots = Array.from({ length: count }, (_unused, i) => (i % 2 === 0 && i + 2 < totalSlots ? i + 1 : i));
    const expected = plain(jacobian, channels, slots, weights, slope);
    const products = new Float64Array(count * count).fill(Number.NaN);
    const gradient = new Float64Array(count);
    weightedCrossProducts(jacobian, channels, Int32Array.from(slots), weights, products, slope, gradient);
    for (let a = 0; a < count; a++) {
      expect(gradient[a]).toBe(expected.gradient[a]);
      for (let b = 0; b < count; b++) {
        if (b >= a) expect(products[a * count + b]).toBe(expected.products[a * count + b]);
        else expect(products[a * count + b]).toBeNaN(); // below the diagonal: untouched
      }
    }
  });

  it('leaves the gradient alone without a slope', () => {
    const gradient = Float64Array.from([7, 7]);
    weightedCrossProducts(
      Float64Array.from([1, 2, 3, 4]),
      2,
      Int32Array.from([0, 1]),
      Float64Array.from([1, 1]),
      new Float64Array(4),
      undefined,
      gradient,
    );
    expect(Array.from(gradient)).toEqual([7, 7]);
  });
});
