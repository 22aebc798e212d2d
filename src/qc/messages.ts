// Wording shared by rule kinds so every flag reads the same way to a technician.
import { formatMetricValue, metricLabel, type MetricName } from './metrics.js';
import type { EstablishedBaseline } from './rule-kind.js';

/** "target 0.925" for a declared target, "baseline mean 0.925" for one computed from runs. */
export function centreName(metric: MetricName, baseline: EstablishedBaseline): string {
  const name = baseline.source === 'declared' ? 'target' : 'baseline mean';
  return `${name} ${formatMetricValue(metric, baseline.mean)}`;
}

/** "control yield 0.871 is 3.4 SD below target 0.925". */
export function describeDeviation(metric: MetricName, value: number, baseline: EstablishedBaseline): string {
  const sdUnits = (value - baseline.mean) / baseline.sd;
  const direction = sdUnits < 0 ? 'below' : 'above';
  return `${metricLabel(metric)} ${formatMetricValue(metric, value)} is ${Math.abs(sdUnits).toFixed(1)} SD ${direction} ${centreName(metric, baseline)}`;
}

/** Standardized value (x − mean) / SD. */
export function standardize(value: number, baseline: EstablishedBaseline): number {
  return (value - baseline.mean) / baseline.sd;
}
