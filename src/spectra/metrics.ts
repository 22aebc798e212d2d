// Descriptive metrics of a spectrum: peak (sub-sample parabola), FWHM, integral, centroid, noise.
import { InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import { trapezoid, trapezoidWeights } from './integrate.js';
import { noiseFromSecondDifferences } from './noise.js';
import { itemAt } from '../model/item-at.js';

export interface PeakEstimate {
  /** Peak wavelength in nm (vertex of the parabola through the maximum and its neighbours). */
  readonly wavelengthNm: number;
  /** Value at the vertex, in the spectrum's value unit. */
  readonly value: number;
  /** True when the maximum sits at the first or last point (no parabola; a true peak may lie outside). */
  readonly atEdge: boolean;
}

export interface SpectrumMetrics {
  readonly peakWavelengthNm: number;
  readonly peakValue: number;
  /** Full width at half maximum, nm; undefined when the band does not fall below half maximum on both sides. */
  readonly fwhmNm: number | undefined;
  /** ∫I dλ over the whole axis (value unit·nm), trapezoid rule. */
  readonly integratedIntensity: number;
  /** ∫λI dλ / ∫I dλ, nm. */
  readonly centroidNm: number;
  /** Noise standard deviation in value units (second differences, see noise.ts). */
  readonly noiseSigma: number | undefined;
  /** peakValue / noiseSigma. */
  readonly peakSignalToNoise: number | undefined;
  readonly warnings: readonly string[];
}

/** Vertex of the parabola through (x0,y0),(x1,y1),(x2,y2) on a non-uniform axis (Lagrange form). */
export function parabolaVertex(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  x2: number,
  y2: number,
): { x: number; y: number } | undefined {
  const d0 = (x0 - x1) * (x0 - x2);
  const d1 = (x1 - x0) * (x1 - x2);
  const d2 = (x2 - x0) * (x2 - x1);
  const a = y0 / d0 + y1 / d1 + y2 / d2;
  const b = -(y0 * (x1 + x2)) / d0 - (y1 * (x0 + x2)) / d1 - (y2 * (x0 + x1)) / d2;
  const c = (y0 * x1 * x2) / d0 + (y1 * x0 * x2) / d1 + (y2 * x0 * x1) / d2;
  if (!(a < 0)) return undefined;
  const x = -b / (2 * a);
  return { x, y: c - (b * b) / (4 * a) };
}

/** Vertex of the least-squares parabola through points (x_i, y_i), x centred on xc for conditioning (3×3 normal equations); undefined unless it opens downward. */
export function leastSquaresParabolaVertex(
  xs: readonly number[],
  ys: readonly number[],
  xc: number,
): { x: number; y: number } | undefined {
  const s = [0, 0, 0, 0, 0];
  const t = [0, 0, 0];
  xs.forEach((x, i) => {
    const d = x - xc;
    const y = itemAt(ys, i);
    for (let p = 0; p <= 4; p++) s[p] = itemAt(s, p) + d ** p;
    for (let p = 0; p <= 2; p++) t[p] = itemAt(t, p) + y * d ** p;
  });
  const [s0, s1, s2, s3, s4] = s as [number, number, number, number, number];
  const [t0, t1, t2] = t as [number, number, number];
  // Cramer's rule on [[s0 s1 s2][s1 s2 s3][s2 s3 s4]]·[a b c] = [t0 t1 t2].
  const det3 = (m: number[]): number =>
    itemAt(m, 0) * (itemAt(m, 4) * itemAt(m, 8) - itemAt(m, 5) * itemAt(m, 7)) -
    itemAt(m, 1) * (itemAt(m, 3) * itemAt(m, 8) - itemAt(m, 5) * itemAt(m, 6)) +
    itemAt(m, 2) * (itemAt(m, 3) * itemAt(m, 7) - itemAt(m, 4) * itemAt(m, 6));
  const det = det3([s0, s1, s2, s1, s2, s3, s2, s3, s4]);
  if (!(Math.abs(det) > 0)) return undefined;
  const a = det3([t0, s1, s2, t1, s2, s3, t2, s3, s4]) / det;
  const b = det3([s0, t0, s2, s1, t1, s3, s2, t2, s4]) / det;
  const c = det3([s0, s1, t0, s1, s2, t1, s2, s3, t2]) / det;
  if (!(c < 0)) return undefined;
  return { x: xc - b / (2 * c), y: a - (b * b) / (4 * c) };
}

/** Peak of values within index range [fromIndex, toIndex]: the maximum refined by a local parabola (nm) through the maximum ± halfWindowPoints (1: exact 3-point parabola; more: least squares, for noisy bands); O(n). */
export function findPeak(
  axis: ArrayLike<number>,
  values: ArrayLike<number>,
  fromIndex = 0,
  toIndex = values.length - 1,
  halfWindowPoints = 1,
): PeakEstimate {
  let best = fromIndex;
  for (let i = fromIndex + 1; i <= toIndex; i++) if (itemAt(values, i) > itemAt(values, best)) best = i;
  if (best === 0 || best === values.length - 1) {
    return { wavelengthNm: itemAt(axis, best), value: itemAt(values, best), atEdge: true };
  }
  const low = Math.max(0, best - halfWindowPoints);
  const high = Math.min(values.length - 1, best + halfWindowPoints);
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = low; i <= high; i++) {
    xs.push(itemAt(axis, i));
    ys.push(itemAt(values, i));
  }
  const vertex =
    xs.length === 3
      ? parabolaVertex(itemAt(xs, 0), itemAt(ys, 0), itemAt(xs, 1), itemAt(ys, 1), itemAt(xs, 2), itemAt(ys, 2))
      : leastSquaresParabolaVertex(xs, ys, itemAt(axis, best));
  if (vertex === undefined || vertex.x < itemAt(axis, best - 1) || vertex.x > itemAt(axis, best + 1)) {
    return { wavelengthNm: itemAt(axis, best), value: itemAt(values, best), atEdge: false };
  }
  return { wavelengthNm: vertex.x, value: vertex.y, atEdge: false };
}

/** FWHM in nm: half-maximum crossings on each side of the peak, linearly interpolated; undefined if a side never drops below half. */
export function fullWidthHalfMaximum(
  axis: ArrayLike<number>,
  values: ArrayLike<number>,
  peakValue: number,
): number | undefined {
  const half = peakValue / 2;
  let top = 0;
  for (let i = 1; i < values.length; i++) if (itemAt(values, i) > itemAt(values, top)) top = i;
  const crossing = (i: number, j: number): number => {
    const xi = itemAt(axis, i);
    const yi = itemAt(values, i);
    const xj = itemAt(axis, j);
    const yj = itemAt(values, j);
    return xi + ((half - yi) * (xj - xi)) / (yj - yi);
  };
  let left: number | undefined;
  for (let i = top; i > 0; i--) {
    if (itemAt(values, i - 1) <= half) {
      left = crossing(i - 1, i);
      break;
    }
  }
  let right: number | undefined;
  for (let i = top; i < values.length - 1; i++) {
    if (itemAt(values, i + 1) <= half) {
      right = crossing(i, i + 1);
      break;
    }
  }
  return left === undefined || right === undefined ? undefined : right - left;
}

/** ∫I dλ (value unit·nm) by the trapezoid rule on the spectrum's non-uniform axis, over windowNm = [from, to] (default all). */
export function integrateIntensity(spectrum: Spectrum, windowNm?: readonly [number, number]): number {
  return trapezoid(spectrum.wavelengthNm, spectrum.values, windowNm?.[0], windowNm?.[1]);
}

/** Integral (value unit·nm) and its standard uncertainty from white noise σ: u = σ·√(Σ w_i²) with trapezoid weights w (GUM, JCGM 100:2008 §5.1). */
export function integralWithUncertainty(
  spectrum: Spectrum,
  windowNm?: readonly [number, number],
): { integral: number; standardUncertainty: number | undefined; noiseSigma: number | undefined } {
  const axis = spectrum.wavelengthNm;
  const from = windowNm?.[0] ?? itemAt(axis, 0);
  const to = windowNm?.[1] ?? itemAt(axis, axis.length - 1);
  const integral = trapezoid(axis, spectrum.values, from, to);
  const weights = trapezoidWeights(axis, from, to);
  const noiseSigma = noiseFromSecondDifferences(axis, spectrum.values);
  let sumSquares = 0;
  for (const w of weights) sumSquares += w * w;
  return {
    integral,
    standardUncertainty: noiseSigma === undefined ? undefined : noiseSigma * Math.sqrt(sumSquares),
    noiseSigma,
  };
}

/** Peak (nm), FWHM (nm), integral (value·nm), centroid (nm), noise σ and peak SNR of a spectrum; throws INPUT_INVALID for a non-positive integral. */
export function spectrumMetrics(spectrum: Spectrum): SpectrumMetrics {
  const axis = spectrum.wavelengthNm;
  const values = spectrum.values;
  const warnings: string[] = [];
  const peak = findPeak(axis, values);
  if (peak.atEdge)
    warnings.push(
      `the maximum lies at the edge of the range (${peak.wavelengthNm} nm); the true peak may be outside it`,
    );
  const fwhmNm = fullWidthHalfMaximum(axis, values, peak.value);
  if (fwhmNm === undefined) warnings.push('the band does not fall to half maximum on both sides; FWHM not reported');
  const integratedIntensity = trapezoid(axis, values);
  const weighted = new Float64Array(axis.length);
  for (let i = 0; i < axis.length; i++) weighted[i] = itemAt(axis, i) * itemAt(values, i);
  if (!(integratedIntensity > 0)) {
    throw new InputRejected(
      'INPUT_INVALID',
      `the integrated intensity is ${integratedIntensity}; a centroid needs a positive band`,
    );
  }
  const centroidNm = trapezoid(axis, weighted) / integratedIntensity;
  const noiseSigma = noiseFromSecondDifferences(axis, values);
  return Object.freeze({
    peakWavelengthNm: peak.wavelengthNm,
    peakValue: peak.value,
    fwhmNm,
    integratedIntensity,
    centroidNm,
    noiseSigma,
    peakSignalToNoise: noiseSigma !== undefined && noiseSigma > 0 ? peak.value / noiseSigma : undefined,
    warnings: Object.freeze(warnings),
  });
}
