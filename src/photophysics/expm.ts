// Matrix exponential by scaling and squaring with the [13/13] Padé approximant
// (Higham, SIAM J. Matrix Anal. Appl. 26, 1179 (2005), Algorithm 2.3 with m = 13 throughout).
import { AnalysisFailed } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';
import { identity, linearCombination, multiply, oneNorm, solve, type SquareMatrix } from './matrix.js';

/** Padé [13/13] coefficients b_0..b_13 (Higham 2005, Table/eq. for m = 13). */
const PADE13 = [
  64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000, 10559470521600,
  670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1,
] as const;
/** θ_13: largest ‖A‖₁ for which Padé [13/13] meets double precision without scaling (Higham 2005, Table 2.3). */
const THETA13 = 5.371920351148152;

const b = (i: number): number => itemAt(PADE13, i);

/** e^A for a square matrix A by scaling and squaring with Padé [13/13] (Higham 2005); O(n³·(6 + s)). */
export function expm(a: SquareMatrix): SquareMatrix {
  const n = a.size;
  for (const value of a.data)
    if (!Number.isFinite(value)) throw new AnalysisFailed('INTERNAL', 'expm: the matrix has a non-finite entry');
  const norm = oneNorm(a);
  const squarings = norm > THETA13 ? Math.max(0, Math.ceil(Math.log2(norm / THETA13))) : 0;
  const scale = Math.pow(2, -squarings);
  const a1 = linearCombination([[scale, a]], n);
  const id = identity(n);
  const a2 = multiply(a1, a1);
  const a4 = multiply(a2, a2);
  const a6 = multiply(a4, a2);
  // U = A·[A6(b13 A6 + b11 A4 + b9 A2) + b7 A6 + b5 A4 + b3 A2 + b1 I]
  const uInner = multiply(
    a6,
    linearCombination(
      [
        [b(13), a6],
        [b(11), a4],
        [b(9), a2],
      ],
      n,
    ),
  );
  const u = multiply(
    a1,
    linearCombination(
      [
        [1, uInner],
        [b(7), a6],
        [b(5), a4],
        [b(3), a2],
        [b(1), id],
      ],
      n,
    ),
  );
  // V = A6(b12 A6 + b10 A4 + b8 A2) + b6 A6 + b4 A4 + b2 A2 + b0 I
  const vInner = multiply(
    a6,
    linearCombination(
      [
        [b(12), a6],
        [b(10), a4],
        [b(8), a2],
      ],
      n,
    ),
  );
  const v = linearCombination(
    [
      [1, vInner],
      [b(6), a6],
      [b(4), a4],
      [b(2), a2],
      [b(0), id],
    ],
    n,
  );
  // r13 = (V − U)⁻¹(V + U)
  let result = solve(
    linearCombination(
      [
        [1, v],
        [-1, u],
      ],
      n,
    ),
    linearCombination(
      [
        [1, v],
        [1, u],
      ],
      n,
    ),
  );
  for (let i = 0; i < squarings; i++) result = multiply(result, result);
  return result;
}
