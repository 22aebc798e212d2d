// The control chart as text for a terminal: one line per run with its value, its distance from the
// baseline mean in SDs drawn on a −3…+3 SD ruler, EWMA and CUSUM, and the flags it raised.
import { formatMetricValue } from '../qc/index.js';
import type { ControlChartData, ChartPoint } from './chart-series.js';
import { axisTitle } from './chart-control-spec.js';

const RULER_HALF = 14; // characters per side: 3 SD = 12 characters, beyond 3.5 SD clipped with < or >
const PER_SD = 4;

/** A 29-character ruler with ":" at ±1/2/3 SD, "|" at the mean and the run's mark. */
function ruler(deviationSd: number | undefined, mark: string): string {
  const cells = Array.from({ length: 2 * RULER_HALF + 1 }, (_, i): string => {
    const offset = i - RULER_HALF;
    if (offset === 0) return '|';
    return offset % PER_SD === 0 && Math.abs(offset) <= 3 * PER_SD ? ':' : ' ';
  });
  if (deviationSd !== undefined) {
    const position = Math.round(deviationSd * PER_SD);
    if (position < -RULER_HALF) cells[0] = '<';
    else if (position > RULER_HALF) cells[2 * RULER_HALF] = '>';
    else cells[position + RULER_HALF] = mark;
  }
  return cells.join('');
}

function markOf(point: ChartPoint): string {
  if (point.flags.length > 0) return '!';
  return point.status === 'baseline' ? 'o' : '*';
}

/** The chart as plain text lines (fixed-width), for `driftlight chart` without --out. */
export function controlChartText(chart: ControlChartData): string {
  const lines = [`control ${chart.controlId} · ${axisTitle(chart)} · ${chart.points.length} runs`];
  const ewmaSource = chart.ewma.ruleId === undefined ? 'kind defaults' : `rule ${chart.ewma.ruleId}`;
  const cusumSource = chart.cusum.ruleId === undefined ? 'kind defaults' : `rule ${chart.cusum.ruleId}`;
  lines.push(
    `EWMA λ = ${chart.ewma.lambda}, L = ${chart.ewma.limitWidth} (${ewmaSource}); CUSUM k = ${chart.cusum.referenceSd} SD, h = ${chart.cusum.decisionSd} SD (${cusumSource})`,
  );
  lines.push(
    `marks: * judged run, o baseline run, ! flagged, x excluded, ? baseline being collected; ruler −3 … +3 SD`,
  );
  for (const period of chart.periods) {
    const points = chart.points.filter((point) => point.period === period.index);
    if (points.length === 0) continue;
    lines.push('');
    const heading = period.fromIso === undefined ? 'period 1' : `rebaseline from ${period.fromIso}`;
    lines.push(
      period.baseline === undefined
        ? `── ${heading}: baseline not established (${period.collecting?.runsSoFar ?? 0} of ${period.collecting?.runsNeeded ?? 0} runs)`
        : `── ${heading}: mean ${formatMetricValue(chart.metric, period.baseline.mean)}, SD ${formatMetricValue(chart.metric, period.baseline.sd)} (${period.baseline.source}, ${period.baseline.runs} runs)`,
    );
    lines.push(
      `${'acquired (UTC)'.padEnd(17)} ${'value'.padStart(14)}  ${'-3  -2  -1   0  +1  +2  +3'.padStart(28)}  ${'SD'.padStart(6)}  ${'EWMA'.padStart(12)}  ${'CUSUM+/-'.padStart(11)}  flags`,
    );
    for (const point of points) {
      const when = point.acquiredAt.replace('T', ' ').slice(0, 16);
      const value = formatMetricValue(chart.metric, point.value);
      const mark = point.status === 'excluded' ? 'x' : point.status === 'collecting' ? '?' : markOf(point);
      const deviation =
        point.deviationSd === undefined ? '' : `${point.deviationSd >= 0 ? '+' : ''}${point.deviationSd.toFixed(2)}`;
      const ewma = point.ewma === undefined ? '' : formatMetricValue(chart.metric, point.ewma);
      const cusum =
        point.cusumUpperSd === undefined || point.cusumLowerSd === undefined
          ? ''
          : `${point.cusumUpperSd.toFixed(1)}/${point.cusumLowerSd.toFixed(1)}`;
      const note = point.status === 'excluded' ? 'excluded' : point.flags.join(', ');
      lines.push(
        `${when.padEnd(17)} ${value.padStart(14)}  ${ruler(point.status === 'excluded' ? undefined : point.deviationSd, mark)}  ${deviation.padStart(6)}  ${ewma.padStart(12)}  ${cusum.padStart(11)}  ${note}`.trimEnd(),
      );
    }
  }
  if (chart.points.length === 0) lines.push('no runs in the period shown');
  return `${lines.join('\n')}\n`;
}
