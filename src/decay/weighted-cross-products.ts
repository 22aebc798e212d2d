// Weighted cross products of Jacobian columns, the inner loop of Gauss–Newton and of the Fisher
// information: Σ_k w_k·J_a[k]·J_b[k] for every pair of listed columns (b ≥ a) and, when asked, Σ_k J_a[k]·s_k.
// Each pass over the channels takes three rows a against three columns b (nine sums, the weight applied
// on the fly), so a column is read a few times rather than once per entry. Every sum runs over k in order
// with the same operations as the plain loop ((J_a·w)·J_b), so the values do not depend on the blocking.
import { itemAt } from '../model/item-at.js';

/**
 * Fills products[a·count + b] (b ≥ a; count = slots.length) with Σ_k w_k·J_a[k]·J_b[k] and, when `slope` and
 * `gradient` are given, gradient[a] with Σ_k J_a[k]·slope_k, for the columns J_a = jacobian[slots[a]·channels …]
 * (column-major). Entries below the diagonal are left untouched. O(channels·count²).
 */
export function weightedCrossProducts(
  jacobian: Float64Array,
  channels: number,
  slots: Int32Array,
  weights: Float64Array,
  products: Float64Array,
  slope?: Float64Array,
  gradient?: Float64Array,
): void {
  const count = slots.length;
  for (let a = 0; a < count; a += 3) {
    // Rows and columns past the last are clamped to it; their duplicate sums are not stored.
    const a1 = Math.min(a + 1, count - 1);
    const a2 = Math.min(a + 2, count - 1);
    const row0 = itemAt(slots, a) * channels;
    const row1 = itemAt(slots, a1) * channels;
    const row2 = itemAt(slots, a2) * channels;
    for (let b = a; b < count; b += 3) {
      const b1 = Math.min(b + 1, count - 1);
      const b2 = Math.min(b + 2, count - 1);
      const column0 = itemAt(slots, b) * channels;
      const column1 = itemAt(slots, b1) * channels;
      const column2 = itemAt(slots, b2) * channels;
      let sum00 = 0;
      let sum01 = 0;
      let sum02 = 0;
      let sum10 = 0;
      let sum11 = 0;
      let sum12 = 0;
      let sum20 = 0;
      let sum21 = 0;
      let sum22 = 0;
      if (b === a && slope !== undefined && gradient !== undefined) {
        let gradient0 = 0;
        let gradient1 = 0;
        let gradient2 = 0;
        for (let k = 0; k < channels; k++) {
          const weight = itemAt(weights, k);
          const s = itemAt(slope, k);
          const value0 = itemAt(jacobian, row0 + k);
          const value1 = itemAt(jacobian, row1 + k);
          const value2 = itemAt(jacobian, row2 + k);
          gradient0 += value0 * s;
          gradient1 += value1 * s;
          gradient2 += value2 * s;
          const x0 = value0 * weight;
          const x1 = value1 * weight;
          const x2 = value2 * weight;
          const y0 = itemAt(jacobian, column0 + k);
          const y1 = itemAt(jacobian, column1 + k);
          const y2 = itemAt(jacobian, column2 + k);
          sum00 += x0 * y0;
          sum01 += x0 * y1;
          sum02 += x0 * y2;
          sum10 += x1 * y0;
          sum11 += x1 * y1;
          sum12 += x1 * y2;
          sum20 += x2 * y0;
          sum21 += x2 * y1;
          sum22 += x2 * y2;
        }
        gradient[a] = gradient0;
        gradient[a1] = gradient1;
        gradient[a2] = gradient2;
      } else {
        for (let k = 0; k < channels; k++) {
          const weight = itemAt(weights, k);
          const x0 = itemAt(jacobian, row0 + k) * weight;
          const x1 = itemAt(jacobian, row1 + k) * weight;
          const x2 = itemAt(jacobian, row2 + k) * weight;
          const y0 = itemAt(jacobian, column0 + k);
          const y1 = itemAt(jacobian, column1 + k);
          const y2 = itemAt(jacobian, column2 + k);
          sum00 += x0 * y0;
          sum01 += x0 * y1;
          sum02 += x0 * y2;
          sum10 += x1 * y0;
          sum11 += x1 * y1;
          sum12 += x1 * y2;
          sum20 += x2 * y0;
          sum21 += x2 * y1;
          sum22 += x2 * y2;
        }
      }
      storeRow(products, count, a, b, b1, b2, sum00, sum01, sum02);
      if (a1 > a) storeRow(products, count, a1, b, b1, b2, sum10, sum11, sum12);
      if (a2 > a1) storeRow(products, count, a2, b, b1, b2, sum20, sum21, sum22);
    }
  }
}

/** Stores the sums of row `row` against columns b, b1, b2 (b1, b2 repeat b at the end), upper triangle only. */
function storeRow(
  products: Float64Array,
  count: number,
  row: number,
  b: number,
  b1: number,
  b2: number,
  sum0: number,
  sum1: number,
  sum2: number,
): void {
  if (b >= row) products[row * count + b] = sum0;
  if (b1 > b && b1 >= row) products[row * count + b1] = sum1;
  if (b2 > b1 && b2 >= row) products[row * count + b2] = sum2;
}
