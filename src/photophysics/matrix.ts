// Small dense square matrices (row-major Float64Array) for the kinetic-scheme solver.
import { AnalysisFailed } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

export interface SquareMatrix {
  readonly size: number;
  /** Row-major entries, size × size. */
  readonly data: Float64Array;
}

/** n × n identity. */
export function identity(size: number): SquareMatrix {
  const data = new Float64Array(size * size);
  for (let i = 0; i < size; i++) data[i * size + i] = 1;
  return { size, data };
}

/** A·B, O(n³). */
export function multiply(a: SquareMatrix, b: SquareMatrix): SquareMatrix {
  const n = a.size;
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      const aik = itemAt(a.data, i * n + k);
      if (aik === 0) continue;
      for (let j = 0; j < n; j++) data[i * n + j] = itemAt(data, i * n + j) + aik * itemAt(b.data, k * n + j);
    }
  }
  return { size: n, data };
}

/** Σ c_i·M_i over matrices of one size. */
export function linearCombination(terms: readonly (readonly [number, SquareMatrix])[], size: number): SquareMatrix {
  const data = new Float64Array(size * size);
  for (const [coefficient, matrix] of terms) {
    if (coefficient === 0) continue;
    for (let i = 0; i < data.length; i++) data[i] = itemAt(data, i) + coefficient * itemAt(matrix.data, i);
  }
  return { size, data };
}

/** Maximum absolute column sum ‖A‖₁. */
export function oneNorm(a: SquareMatrix): number {
  let best = 0;
  for (let j = 0; j < a.size; j++) {
    let sum = 0;
    for (let i = 0; i < a.size; i++) sum += Math.abs(itemAt(a.data, i * a.size + j));
    best = Math.max(best, sum);
  }
  return best;
}

/** X with A·X = B by LU decomposition with partial pivoting, O(n³); throws AnalysisFailed for a singular A. */
export function solve(a: SquareMatrix, b: SquareMatrix): SquareMatrix {
  const n = a.size;
  const lu = Float64Array.from(a.data);
  const x = Float64Array.from(b.data);
  for (let column = 0; column < n; column++) {
    let pivot = column;
    for (let row = column + 1; row < n; row++) {
      if (Math.abs(itemAt(lu, row * n + column)) > Math.abs(itemAt(lu, pivot * n + column))) pivot = row;
    }
    const pivotValue = itemAt(lu, pivot * n + column);
    if (pivotValue === 0 || !Number.isFinite(pivotValue))
      throw new AnalysisFailed('INTERNAL', 'singular matrix in a linear solve');
    if (pivot !== column) {
      for (let j = 0; j < n; j++) {
        const t = itemAt(lu, column * n + j);
        lu[column * n + j] = itemAt(lu, pivot * n + j);
        lu[pivot * n + j] = t;
        const u = itemAt(x, column * n + j);
        x[column * n + j] = itemAt(x, pivot * n + j);
        x[pivot * n + j] = u;
      }
    }
    for (let row = column + 1; row < n; row++) {
      const factor = itemAt(lu, row * n + column) / pivotValue;
      if (factor === 0) continue;
      for (let j = column; j < n; j++) lu[row * n + j] = itemAt(lu, row * n + j) - factor * itemAt(lu, column * n + j);
      for (let j = 0; j < n; j++) x[row * n + j] = itemAt(x, row * n + j) - factor * itemAt(x, column * n + j);
    }
  }
  for (let row = n - 1; row >= 0; row--) {
    for (let j = 0; j < n; j++) {
      let sum = itemAt(x, row * n + j);
      for (let k = row + 1; k < n; k++) sum -= itemAt(lu, row * n + k) * itemAt(x, k * n + j);
      x[row * n + j] = sum / itemAt(lu, row * n + row);
    }
  }
  return { size: n, data: x };
}

/** A·v for a vector v. */
export function multiplyVector(a: SquareMatrix, v: ArrayLike<number>): Float64Array {
  const n = a.size;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    for (let j = 0; j < n; j++) sum += itemAt(a.data, i * n + j) * itemAt(v, j);
    out[i] = sum;
  }
  return out;
}
