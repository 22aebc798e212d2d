// Public entry of the spectral core: corrections (each returns { spectrum, record }), scales and metrics.
export {
  hashSpectrumData,
  makeCorrectionRecord,
  type CorrectionRecord,
  type CorrectionResult,
} from './correction-record.js';
export { subtractDark, resolveDarkOptions, type DarkOptions } from './dark.js';
export { subtractBlank, resolveBlankOptions, type BlankOptions } from './blank.js';
export {
  normalizeByReferenceChannel,
  findReferenceChannel,
  resolveReferenceChannelOptions,
  type ReferenceChannelOptions,
} from './reference-channel.js';
export {
  applyDetectorCorrection,
  detectorCurveMeaningFromHeader,
  resolveDetectorCorrectionOptions,
  type DetectorCorrectionOptions,
} from './detector-correction.js';
export {
  correctInnerFilter,
  centredInnerFilterFactor,
  geometricInnerFilterFactor,
  resolveInnerFilterOptions,
  type InnerFilterOptions,
} from './inner-filter.js';
export {
  toEnergyScale,
  toWavenumberScale,
  resolveScaleOptions,
  HC_EV_NM,
  type ConvertedSpectrum,
  type ScaleOptions,
} from './energy-scale.js';
export {
  spectrumMetrics,
  integrateIntensity,
  integralWithUncertainty,
  findPeak,
  fullWidthHalfMaximum,
  type SpectrumMetrics,
  type PeakEstimate,
} from './metrics.js';
export { noiseFromSecondDifferences } from './noise.js';
export { stokesShift } from './stokes-shift.js';
export {
  ramanTest,
  ramanPeakNm,
  resolveRamanOptions,
  WATER_RAMAN_SHIFT_PER_CM,
  type RamanOptions,
  type RamanTestResult,
} from './raman.js';
export { trapezoid } from './integrate.js';
export { interpolateAt, resampleOnto } from './interpolate.js';
export { bandEdgeFractions, defaultIntegrationWindow } from './band-coverage.js';
