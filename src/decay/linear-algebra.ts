// Small dense symmetric positive-definite algebra for the fit: Cholesky factorisation, solve and inverse
// (Golub & Van Loan, Matrix Computations, §4.2). Matrices are row-major Float64Array of size p·p.
import { itemAt } from '../model/item-at.js';

/** Factorises a symmetric positive-definite p×p matrix in place into its lower Cholesky factor; false if not positive definite. O(p³/3). */
export function choleskyInPlace(matrix: Float64Array, size: number): boolean {
  for (let j = 0; j < size; j++) {
    let diagonal = itemAt(matrix, j * size + j);
    for (let k = 0; k < j; k++) {
      const value = itemAt(matrix, j * size + k);
      diagonal -= value * value;
    }
    if (!(diagonal > 0) || !Number.isFinite(diagonal)) return false;
    const root = Math.sqrt(diagonal);
    matrix[j * size + j] = root;
    for (let i = j + 1; i < size; i++) {
      let sum = itemAt(matrix, i * size + j);
      for (let k = 0; k < j; k++) sum -= itemAt(matrix, i * size + k) * itemAt(matrix, j * size + k);
      matrix[i * size + j] = sum / root;
    }
  }
  return true;
}

/** Solves L·Lᵀ·x = b in place in `vector` given the lower Cholesky factor; O(p²). */
export function choleskySolveInPlace(factor: Float64Array, size: number, vector: Float64Array): void {
  for (let i = 0; i < size; i++) {
    let sum = itemAt(vector, i);
    for (let k = 0; k < i; k++) sum -= itemAt(factor, i * size + k) * itemAt(vector, k);
    vector[i] = sum / itemAt(factor, i * size + i);
  }
  for (let i = size - 1; i >= 0; i--) {
    let sum = itemAt(vector, i);
    for (let k = i + 1; k < size; k++) sum -= itemAt(factor, k * size + i) * itemAt(vector, k);
    vector[i] = sum / itemAt(factor, i * size + i);
  }
}

/** Inverse of a symmetric positive-definite p×p matrix (new array), or undefined when it is singular; O(p³). */
export function invertPositiveDefinite(matrix: Float64Array, size: number): Float64Array | undefined {
  const factor = Float64Array.from(matrix);
  if (!choleskyInPlace(factor, size)) return undefined;
  const inverse = new Float64Array(size * size);
  const column = new Float64Array(size);
  for (let j = 0; j < size; j++) {
    column.fill(0);
    column[j] = 1;
    choleskySolveInPlace(factor, size, column);
    for (let i = 0; i < size; i++) inverse[i * size + j] = itemAt(column, i);
  }
  return inverse;
}
