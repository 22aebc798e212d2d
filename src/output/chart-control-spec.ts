// The control chart as a Vega-Lite specification: values with baseline mean and ±1/2/3 SD per
// period (Levey–Jennings), flagged runs marked with their rule, excluded runs as crosses, rebaselines
// as vertical breaks; below it the EWMA with its exact limits and the two-sided tabular CUSUM.
import type { TopLevelSpec } from 'vega-lite';
import { formatMetricValue } from '../qc/index.js';
import type { ChartPoint, ControlChartData } from './chart-series.js';
import { INK, LIMIT_GREY, OKABE_ITO } from './chart-palette.js';

const WIDTH = 640;
const STATUS_LABEL: Record<ChartPoint['status'], string> = {
  judged: 'judged run',
  baseline: 'baseline run',
  collecting: 'run (baseline being collected)',
  excluded: 'excluded run',
};

/** "control yield" or "mean lifetime (ns)". */
export function axisTitle(chart: Pick<ControlChartData, 'metricLabel' | 'unit'>): string {
  return chart.unit === '' ? `${chart.metricLabel} (dimensionless)` : `${chart.metricLabel} (${chart.unit})`;
}

function xDomain(chart: ControlChartData): [number, number] {
  const times = [...chart.points.map((p) => p.epochMs), ...chart.breaks.map((b) => b.epochMs)];
  if (times.length === 0) return [0, 1];
  const low = Math.min(...times);
  const high = Math.max(...times);
  const pad = Math.max((high - low) * 0.02, 3_600_000);
  return [low - pad, high + pad];
}

function xEncoding(domain: [number, number], title: string | null): Record<string, unknown> {
  return {
    field: 'tMs',
    type: 'temporal',
    scale: { type: 'utc', domain },
    axis: { title, format: '%Y-%m-%d', labelAngle: 0, labelFlush: true, tickCount: 6 },
  };
}

/** Text alternative of a control chart: runs, baselines, flags, exclusions and breaks in words. */
export function describeControlChart(chart: ControlChartData): string {
  const { points } = chart;
  if (points.length === 0) return `No ${chart.metricLabel} values for control ${chart.controlId} in the period shown.`;
  const first = points[0]?.acquiredAt ?? '';
  const last = points[points.length - 1]?.acquiredAt ?? '';
  const parts = [`${points.length} runs of control ${chart.controlId} from ${first} to ${last}.`];
  for (const period of chart.periods) {
    const start = period.fromIso === undefined ? 'first period' : `period from ${period.fromIso}`;
    parts.push(
      period.baseline === undefined
        ? `${start}: baseline not yet established (${period.collecting?.runsSoFar ?? 0} of ${period.collecting?.runsNeeded ?? 0} runs).`
        : `${start}: baseline mean ${formatMetricValue(chart.metric, period.baseline.mean)}, SD ${formatMetricValue(chart.metric, period.baseline.sd)} (${period.baseline.source}).`,
    );
  }
  const flagged = points.filter((p) => p.flags.length > 0);
  parts.push(
    flagged.length === 0
      ? 'No flagged runs.'
      : `Flagged runs: ${flagged.map((p) => `${p.acquiredAt} ${formatMetricValue(chart.metric, p.value)} (${p.flags.join(', ')})`).join('; ')}.`,
  );
  const excluded = points.filter((p) => p.status === 'excluded');
  if (excluded.length > 0) parts.push(`Excluded runs: ${excluded.map((p) => p.acquiredAt).join(', ')}.`);
  if (chart.breaks.length > 0) parts.push(`Rebaselines at ${chart.breaks.map((b) => b.iso).join(', ')}.`);
  const latest = points[points.length - 1];
  if (latest !== undefined)
    parts.push(
      `Latest value ${formatMetricValue(chart.metric, latest.value)}${latest.deviationSd === undefined ? '' : ` (${latest.deviationSd >= 0 ? '+' : ''}${latest.deviationSd.toFixed(2)} SD)`}.`,
    );
  return parts.join(' ');
}

/** Vega-Lite spec of the control chart with its EWMA and CUSUM panels (Westgard, Clin. Chem. 27, 493, 1981; Roberts 1959; Page 1954). */
export function controlChartSpec(chart: ControlChartData, title: string): TopLevelSpec {
  const domain = xDomain(chart);
  const rows = chart.points.map((p) => ({
    tMs: p.epochMs,
    acquiredAt: p.acquiredAt,
    setId: p.setId,
    value: p.value,
    status: STATUS_LABEL[p.status],
    period: p.period,
    flags: p.flags.join(', '),
    flagged: p.flags.length > 0,
    // The short label drawn beside a flagged run: the checks that fired ("1-3s 2-2s EWMA"); the tooltip, text alternative and table name the rules.
    checks: [...new Set(p.flags.map((flag) => flag.slice(flag.indexOf(' ') + 1)))].join(' '),
    deviationSd: p.deviationSd ?? null,
    ewma: p.ewma ?? null,
    ewmaLower: p.ewmaLower ?? null,
    ewmaUpper: p.ewmaUpper ?? null,
    cusumUpperSd: p.cusumUpperSd ?? null,
    cusumLowerNegSd: p.cusumLowerSd === undefined ? null : -p.cusumLowerSd,
  }));
  const limitRows = chart.periods.flatMap((period) => {
    if (period.baseline === undefined) return [];
    const { mean, sd } = period.baseline;
    const start = Math.max(period.startEpochMs, domain[0]);
    const end = Math.min(period.endEpochMs, domain[1]);
    return [
      { tMs: start, tEndMs: end, y: mean, level: 'mean' },
      ...[1, 2, 3].flatMap((k) => [
        { tMs: start, tEndMs: end, y: mean + k * sd, level: `±${k} SD` },
        { tMs: start, tEndMs: end, y: mean - k * sd, level: `±${k} SD` },
      ]),
    ];
  });
  const breakRows = chart.breaks.map((b) => ({ tMs: b.epochMs, label: 'rebaseline' }));
  const judged = rows.filter((r) => r.ewma !== null);
  const x = xEncoding(domain, null);
  const xBottom = xEncoding(domain, 'acquisition time (UTC)');
  const dashScale = {
    domain: ['mean', '±1 SD', '±2 SD', '±3 SD'],
    range: [
      [1, 0],
      [2, 3],
      [6, 3],
      [10, 3],
    ],
  };
  const yTitle = axisTitle(chart);
  const valuesPanel = {
    title: { text: `${chart.metricLabel}: values with baseline mean and ±1/2/3 SD`, fontSize: 12, anchor: 'start' },
    width: WIDTH,
    height: 220,
    layer: [
      {
        data: { values: limitRows },
        mark: { type: 'rule', strokeWidth: 1 },
        encoding: {
          x,
          x2: { field: 'tEndMs' },
          y: { field: 'y', type: 'quantitative', title: yTitle, scale: { zero: false } },
          strokeDash: { field: 'level', type: 'nominal', scale: dashScale, legend: { title: 'baseline lines' } },
          color: { value: LIMIT_GREY },
        },
      },
      ...(breakRows.length === 0
        ? []
        : [
            {
              data: { values: breakRows },
              mark: { type: 'rule', strokeWidth: 2, color: OKABE_ITO.reddishPurple },
              encoding: { x },
            },
            {
              data: { values: breakRows },
              mark: { type: 'text', align: 'left', dx: 3, baseline: 'top', y: 2, color: OKABE_ITO.reddishPurple },
              encoding: { x, text: { field: 'label' } },
            },
          ]),
      {
        data: { values: rows.filter((r) => r.status !== STATUS_LABEL.excluded) },
        mark: { type: 'line', color: OKABE_ITO.blue, strokeWidth: 1 },
        encoding: { x, y: { field: 'value', type: 'quantitative' }, detail: { field: 'period' } },
      },
      {
        data: { values: rows },
        mark: { type: 'point', filled: true, size: 36, strokeWidth: 1.5 },
        encoding: {
          x,
          y: { field: 'value', type: 'quantitative' },
          color: {
            field: 'status',
            type: 'nominal',
            scale: {
              domain: Object.values(STATUS_LABEL),
              range: [OKABE_ITO.blue, OKABE_ITO.skyBlue, LIMIT_GREY, OKABE_ITO.black],
            },
            legend: { title: 'run' },
          },
          shape: {
            field: 'status',
            type: 'nominal',
            scale: { domain: Object.values(STATUS_LABEL), range: ['circle', 'square', 'triangle-up', 'cross'] },
            legend: null,
          },
          tooltip: [
            { field: 'acquiredAt', title: 'acquired' },
            { field: 'setId', title: 'set' },
            { field: 'value', title: yTitle, format: '.4~g' },
            { field: 'flags', title: 'flags' },
          ],
        },
      },
      {
        data: { values: rows.filter((r) => r.flagged) },
        mark: {
          type: 'point',
          shape: 'diamond',
          size: 140,
          strokeWidth: 2,
          color: OKABE_ITO.vermillion,
          filled: false,
        },
        encoding: { x, y: { field: 'value', type: 'quantitative' } },
      },
      {
        data: { values: rows.filter((r) => r.flagged) },
        mark: { type: 'text', dy: -12, fontSize: 9, color: OKABE_ITO.vermillion },
        encoding: { x, y: { field: 'value', type: 'quantitative' }, text: { field: 'checks' } },
      },
    ],
  };
  const ewmaPanel = {
    title: {
      text: `EWMA (λ = ${chart.ewma.lambda}, L = ${chart.ewma.limitWidth}${chart.ewma.ruleId === undefined ? ', kind defaults: no ewma rule for this metric' : `, rule ${chart.ewma.ruleId}`})`,
      fontSize: 12,
      anchor: 'start',
    },
    width: WIDTH,
    height: 110,
    data: { values: judged },
    layer: [
      {
        mark: { type: 'line', interpolate: 'step-after', color: LIMIT_GREY, strokeDash: [6, 3] },
        encoding: {
          x,
          y: {
            field: 'ewmaUpper',
            type: 'quantitative',
            title: `EWMA (${chart.unit === '' ? 'dimensionless' : chart.unit})`,
            scale: { zero: false },
          },
          detail: { field: 'period' },
        },
      },
      {
        mark: { type: 'line', interpolate: 'step-after', color: LIMIT_GREY, strokeDash: [6, 3] },
        encoding: { x, y: { field: 'ewmaLower', type: 'quantitative' }, detail: { field: 'period' } },
      },
      {
        mark: { type: 'line', color: OKABE_ITO.orange, point: { filled: true, size: 20, color: OKABE_ITO.orange } },
        encoding: { x, y: { field: 'ewma', type: 'quantitative' }, detail: { field: 'period' } },
      },
    ],
  };
  const cusumPanel = {
    title: {
      text: `tabular CUSUM (k = ${chart.cusum.referenceSd} SD, h = ${chart.cusum.decisionSd} SD${chart.cusum.ruleId === undefined ? ', kind defaults: no cusum rule for this metric' : `, rule ${chart.cusum.ruleId}`}); lower sum drawn below zero`,
      fontSize: 12,
      anchor: 'start',
    },
    width: WIDTH,
    height: 110,
    layer: [
      {
        data: { values: [{ y: chart.cusum.decisionSd }, { y: -chart.cusum.decisionSd }] },
        mark: { type: 'rule', color: LIMIT_GREY, strokeDash: [6, 3] },
        encoding: { y: { field: 'y', type: 'quantitative' } },
      },
      {
        data: { values: judged },
        mark: {
          type: 'line',
          color: OKABE_ITO.blue,
          point: { filled: true, size: 20, shape: 'triangle-up', color: OKABE_ITO.blue },
        },
        encoding: {
          x: xBottom,
          y: { field: 'cusumUpperSd', type: 'quantitative', title: 'CUSUM (SD)' },
          detail: { field: 'period' },
        },
      },
      {
        data: { values: judged },
        mark: {
          type: 'line',
          color: OKABE_ITO.vermillion,
          strokeDash: [4, 2],
          point: { filled: true, size: 20, shape: 'triangle-down', color: OKABE_ITO.vermillion },
        },
        encoding: { x: xBottom, y: { field: 'cusumLowerNegSd', type: 'quantitative' }, detail: { field: 'period' } },
      },
    ],
  };
  const panels =
    judged.length === 0
      ? [
          {
            ...valuesPanel,
            layer: valuesPanel.layer.map((layer) => ({
              ...layer,
              encoding: { ...layer.encoding, ...('x' in layer.encoding ? { x: xBottom } : {}) },
            })),
          },
        ]
      : [valuesPanel, ewmaPanel, cusumPanel];
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: title, anchor: 'start', color: INK },
    description: describeControlChart(chart),
    background: 'white',
    config: { font: 'sans-serif', axis: { labelColor: INK, titleColor: INK }, legend: { orient: 'right' } },
    vconcat: panels,
    resolve: { scale: { color: 'independent', strokeDash: 'independent' } },
  };
  return spec as TopLevelSpec;
}
