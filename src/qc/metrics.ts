// The QC metric vocabulary: what a control or instrument observation can carry, with the wording and
// unit used in technician-facing messages. One table; add a metric by adding a row.
import { formatSignificant } from '../model/format-number.js';

/** Every metric the rules engine can watch, with its message label, unit and display decimals. */
export const METRICS = {
  controlQuantumYield: { label: 'control yield', unit: '', decimals: 3 },
  meanLifetimeNs: { label: 'mean lifetime', unit: 'ns', decimals: 3 },
  intensityPerAbsorbedLight: { label: 'integrated intensity per absorbed light', unit: 'a.u.', decimals: 4 },
  peakWavelengthNm: { label: 'emission peak', unit: 'nm', decimals: 1 },
  fwhmNm: { label: 'emission FWHM', unit: 'nm', decimals: 1 },
  irfWidthNs: { label: 'IRF width', unit: 'ns', decimals: 3 },
  ramanSnr: { label: 'water Raman SNR', unit: '', decimals: 0 },
  ramanPeakErrorNm: { label: 'water Raman peak error', unit: 'nm', decimals: 2 },
  absorbanceAtExcitation: { label: 'absorbance at excitation', unit: '', decimals: 4 },
  countRateToRepetitionRatePercent: { label: 'count rate relative to repetition rate', unit: '%', decimals: 2 },
  fitChi2Reduced: { label: 'fit reduced chi-square', unit: '', decimals: 2 },
} as const satisfies Record<string, { label: string; unit: string; decimals: number }>;

export type MetricName = keyof typeof METRICS;

/** The metric names as a tuple, for schemas and iteration. */
export const METRIC_NAMES = Object.keys(METRICS) as [MetricName, ...MetricName[]];

/** One control (or instrument-check) measurement reduced to the metrics the rules watch. */
export interface ControlObservation {
  /** The control this observation belongs to (a `controls[].id` of the rule set). */
  readonly controlId: string;
  /** The measurement set (run) that produced it; observations with the same setId share a run. */
  readonly setId: string;
  /** Acquisition time, ISO 8601 with offset or Z. */
  readonly acquiredAt: string;
  readonly metrics: Partial<Record<MetricName, number>>;
  /** The column judged when the run's file holds several measurements (issue 18.3); absent for a single one. */
  readonly measurement?: string;
}

/** `value` formatted with the metric's display decimals and unit ("4.012 ns"); from 1e5 up, 5 significant digits ("7.4142e7 a.u."). */
export function formatMetricValue(metric: MetricName, value: number): string {
  const { unit, decimals } = METRICS[metric];
  const text = Math.abs(value) >= 1e5 ? formatSignificant(value, 5) : value.toFixed(decimals);
  if (unit === '') return text;
  return unit === '%' ? `${text} %` : `${text} ${unit}`;
}

/** The technician-facing name of a metric ("control yield"). */
export function metricLabel(metric: MetricName): string {
  return METRICS[metric].label;
}
