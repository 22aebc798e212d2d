// Pile-up in single-photon timing: only the first photon per excitation cycle is timed, so late
// channels are under-counted at high count rates. The Coates correction (Coates, J. Phys. E 1, 878
// (1968)) recovers the expected photons per cycle in channel i from N excitation cycles:
//   r_i = ln[(N − Σ_{j<i} n_j) / (N − Σ_{j≤i} n_j)],   corrected counts = N·r_i.
// The rule of thumb (common practice) is a count rate at most 1–5 % of the excitation rate.
import { AnalysisFailed } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

/** Count-rate fraction above which pile-up distorts decays (5 % of the repetition rate; common practice). */
export const PILE_UP_RATE_FRACTION = 0.05;

/** Coates-corrected counts (new array) for `excitationCycles` = collection time (s) × repetition rate (Hz); O(n). Throws OUT_OF_RANGE if counts ≥ cycles. */
export function coatesCorrection(counts: ArrayLike<number>, excitationCycles: number): Float64Array {
  const corrected = new Float64Array(counts.length);
  let before = 0;
  for (let i = 0; i < counts.length; i++) {
    const through = before + itemAt(counts, i);
    if (through >= excitationCycles) {
      throw new AnalysisFailed(
        'OUT_OF_RANGE',
        `pile-up correction impossible: ${through} photons counted in ${excitationCycles} excitation cycles`,
      );
    }
    corrected[i] = excitationCycles * Math.log((excitationCycles - before) / (excitationCycles - through));
    before = through;
  }
  return corrected;
}
