// The integration window of a relative yield and whether an emission band is back to baseline at its
// edges: a scan cut short inside its band, or one that reaches into the excitation (Rayleigh) line,
// makes the integral wrong without any sign in the number itself.
import { InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import { interpolateAt } from './interpolate.js';
import { itemAt } from '../model/item-at.js';

/**
 * Default window (nm): the range common to all spectra, starting `exclusionNm` above λex and ending `exclusionNm` below
 * 2·λex (first-order Rayleigh line and its second grating order; common practice). Throws AXIS_NOT_COVERED when empty.
 */
export function defaultIntegrationWindow(
  spectra: readonly Spectrum[],
  excitationNm: number | undefined,
  exclusionNm: number,
): [number, number] {
  let from = -Infinity;
  let to = Infinity;
  for (const s of spectra) {
    from = Math.max(from, itemAt(s.wavelengthNm, 0));
    to = Math.min(to, itemAt(s.wavelengthNm, s.wavelengthNm.length - 1));
  }
  if (excitationNm !== undefined) {
    from = Math.max(from, excitationNm + exclusionNm);
    to = Math.min(to, 2 * excitationNm - exclusionNm);
  }
  if (!(from < to)) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the emission spectra have no common range outside ±${exclusionNm} nm of the excitation ${excitationNm ?? '?'} nm and its second order; ` +
        'measure both over the same range or set analysis.yieldWindowNm',
    );
  }
  return [from, to];
}

/** Edge value over peak (dimensionless) at both ends of `windowNm`; the peak is the largest value inside the window. */
export function bandEdgeFractions(
  spectrum: Spectrum,
  windowNm: readonly [number, number],
): { readonly lower: number; readonly upper: number; readonly peak: number } {
  const axis = spectrum.wavelengthNm;
  let peak = 0;
  for (let i = 0; i < axis.length; i++) {
    const x = itemAt(axis, i);
    if (x >= windowNm[0] && x <= windowNm[1]) peak = Math.max(peak, itemAt(spectrum.values, i));
  }
  const lowerValue = interpolateAt(axis, spectrum.values, windowNm[0]) ?? Number.NaN;
  const upperValue = interpolateAt(axis, spectrum.values, windowNm[1]) ?? Number.NaN;
  return { lower: peak > 0 ? lowerValue / peak : Number.NaN, upper: peak > 0 ? upperValue / peak : Number.NaN, peak };
}
