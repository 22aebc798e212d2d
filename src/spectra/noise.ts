// Noise estimate of a spectrum from local second differences, robust to a few spikes (median absolute deviation).
import { medianOf } from '../model/median.js';
import { itemAt } from '../model/item-at.js';

/**
 * Standard deviation of white noise on the values (value units), from second differences on a non-uniform axis:
 * r_i = y_i − [w·y_{i−1} + (1−w)·y_{i+1}] has variance σ²(1 + w² + (1−w)²) (= 1.5σ² on a uniform axis, i.e. var of the
 * second difference = 6σ²); σ = 1.4826·MAD(r/√(1+w²+(1−w)²)). A smooth band adds only its curvature h²·y''/2, small
 * when the band is sampled with ≥ 5 points per FWHM. Method: common practice (second-difference noise estimators,
 * e.g. von Neumann's mean square successive difference generalised to second order). Points from..to are indices.
 */
export function noiseFromSecondDifferences(
  axis: ArrayLike<number>,
  values: ArrayLike<number>,
  fromIndex = 0,
  toIndex = values.length - 1,
): number | undefined {
  const scaled: number[] = [];
  for (let i = Math.max(1, fromIndex + 1); i <= Math.min(values.length - 2, toIndex - 1); i++) {
    const x0 = itemAt(axis, i - 1);
    const x1 = itemAt(axis, i);
    const x2 = itemAt(axis, i + 1);
    const w = (x2 - x1) / (x2 - x0);
    const predicted = w * itemAt(values, i - 1) + (1 - w) * itemAt(values, i + 1);
    scaled.push((itemAt(values, i) - predicted) / Math.sqrt(1 + w * w + (1 - w) * (1 - w)));
  }
  if (scaled.length < 3) return undefined;
  const center = medianOf(scaled);
  return 1.482602218505602 * medianOf(scaled.map((r) => Math.abs(r - center)));
}
