// Vega-Lite specifications of the digest's own plots: the day's control decay with its fit on a log
// axis and the weighted residuals below, the day's corrected emission spectra overlaid, and the
// instrument-health trends; each with a text alternative.
import type { TopLevelSpec } from 'vega-lite';
import { formatMetricValue } from '../qc/index.js';
import { INK, LIMIT_GREY, OKABE_ITO, SERIES_COLOURS } from './chart-palette.js';
import type { DecayPlotData, HealthTrend, SpectrumPlotData } from './digest-model.js';

const WIDTH = 640;
const BASE = {
  $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
  background: 'white',
  config: { font: 'sans-serif', axis: { labelColor: INK, titleColor: INK } },
};

/** Text alternative of the decay plot. */
export function describeDecay(plot: DecayPlotData): string {
  const [first, last] = plot.fitRange;
  const peak = Math.max(...plot.counts);
  const residuals = plot.weightedResidual.slice(first, last + 1);
  const within2 = residuals.filter((r) => Math.abs(r) <= 2).length;
  return (
    `Decay of control set ${plot.setId} (${plot.sampleId}): ${plot.counts.length} channels, peak ${peak} counts; ` +
    `fit from ${plot.timeNs[first]?.toFixed(2) ?? '?'} to ${plot.timeNs[last]?.toFixed(2) ?? '?'} ns` +
    `${plot.chi2Reduced === undefined ? '' : `, reduced chi-square ${plot.chi2Reduced.toFixed(3)}`}; ` +
    `${within2} of ${residuals.length} weighted residuals within ±2.`
  );
}

/** The control decay (counts and fit, log scale) with weighted residuals below (O'Connor & Phillips, Time-Correlated Single Photon Counting, 1984, ch. 7). */
export function decaySpec(plot: DecayPlotData, title: string): TopLevelSpec {
  // Zero-count channels cannot sit on a log axis: they are left out of the counts layer (the residual panel keeps every fitted channel).
  const rows = plot.timeNs.map((t, i) => ({
    t,
    counts: plot.counts[i] ?? 0,
    fit: plot.fit[i] ?? 0,
    residual: plot.weightedResidual[i] ?? 0,
    fitted: i >= plot.fitRange[0] && i <= plot.fitRange[1],
  }));
  const x = {
    field: 't',
    type: 'quantitative',
    title: null,
    scale: { domain: [plot.timeNs[0] ?? 0, plot.timeNs[plot.timeNs.length - 1] ?? 1], nice: false },
  };
  const spec = {
    ...BASE,
    title: { text: title, anchor: 'start', color: INK },
    description: describeDecay(plot),
    vconcat: [
      {
        width: WIDTH,
        height: 220,
        layer: [
          {
            data: { values: rows.filter((r) => r.counts > 0) },
            mark: { type: 'point', filled: true, size: 8, color: OKABE_ITO.blue, opacity: 0.7 },
            encoding: {
              x,
              y: {
                field: 'counts',
                type: 'quantitative',
                scale: { type: 'log' },
                title: 'counts per channel (log scale)',
              },
            },
          },
          {
            data: { values: rows.filter((r) => r.fitted && r.fit > 0) },
            mark: { type: 'line', color: OKABE_ITO.vermillion, strokeWidth: 1.5 },
            encoding: { x, y: { field: 'fit', type: 'quantitative', scale: { type: 'log' } } },
          },
        ],
      },
      {
        width: WIDTH,
        height: 90,
        layer: [
          {
            data: { values: [{ y: 0 }, { y: 2 }, { y: -2 }] },
            mark: { type: 'rule', color: LIMIT_GREY, strokeDash: [4, 3] },
            encoding: { y: { field: 'y', type: 'quantitative' } },
          },
          {
            data: { values: rows.filter((r) => r.fitted) },
            mark: { type: 'point', filled: true, size: 6, color: OKABE_ITO.black },
            encoding: {
              x: { ...x, title: 'time (ns)' },
              y: { field: 'residual', type: 'quantitative', title: 'weighted residual (dimensionless)' },
            },
          },
        ],
      },
    ],
  };
  return spec as TopLevelSpec;
}

/** Text alternative of the emission overlay. */
export function describeEmission(spectra: readonly SpectrumPlotData[]): string {
  return (
    `${spectra.length} corrected emission spectra: ` +
    spectra
      .map((s) => {
        let peak = 0;
        s.values.forEach((v, i) => {
          if (v > (s.values[peak] ?? -Infinity)) peak = i;
        });
        return `${s.sampleId} (${s.role}) peak at ${s.wavelengthNm[peak]?.toFixed(1) ?? '?'} nm`;
      })
      .join('; ') +
    '. Each spectrum is scaled to its own maximum.'
  );
}

/** The day's corrected emission spectra, each normalised to its maximum, overlaid. */
export function emissionSpec(spectra: readonly SpectrumPlotData[], title: string): TopLevelSpec {
  const rows = spectra.flatMap((s) => {
    const max = Math.max(...s.values);
    return s.wavelengthNm.map((nm, i) => ({
      nm,
      value: max > 0 ? (s.values[i] ?? 0) / max : 0,
      sample: `${s.sampleId} (${s.role})`,
    }));
  });
  const names = spectra.map((s) => `${s.sampleId} (${s.role})`);
  const spec = {
    ...BASE,
    title: { text: title, anchor: 'start', color: INK },
    description: describeEmission(spectra),
    width: WIDTH,
    height: 260,
    data: { values: rows },
    mark: { type: 'line', strokeWidth: 1.5 },
    encoding: {
      x: { field: 'nm', type: 'quantitative', title: 'wavelength (nm)', scale: { zero: false } },
      y: { field: 'value', type: 'quantitative', title: 'corrected intensity, normalised to maximum (dimensionless)' },
      color: {
        field: 'sample',
        type: 'nominal',
        scale: { domain: names, range: SERIES_COLOURS.slice(0, Math.max(1, names.length)) },
        legend: { title: 'set' },
      },
      strokeDash: {
        field: 'sample',
        type: 'nominal',
        scale: {
          domain: names,
          range: names.map(
            (_n, i) =>
              [
                [1, 0],
                [6, 3],
                [2, 2],
                [8, 3, 2, 3],
              ][i % 4],
          ),
        },
        legend: null,
      },
    },
  };
  return spec as TopLevelSpec;
}

/** Text alternative of the instrument trends. */
export function describeTrends(trends: readonly HealthTrend[]): string {
  return (
    trends
      .filter((t) => t.points.length > 0)
      .map(
        (t) =>
          `${t.label}${t.scope === 'instrument' ? '' : ` (${t.scope})`}: ${t.points.length} values, latest ${t.latest === undefined ? '—' : formatMetricValue(t.metric, t.latest)}` +
          `${t.slopePerDay === undefined ? '' : `, trend ${t.slopePerDay >= 0 ? '+' : ''}${t.slopePerDay.toPrecision(3)} ${t.unit === '' ? '' : `${t.unit} `}per day`}`,
      )
      .join('; ') + '.'
  );
}

/** One small panel per instrument-health metric over the history window. */
export function trendsSpec(trends: readonly HealthTrend[], title: string): TopLevelSpec {
  const shown = trends.filter((t) => t.points.length > 0);
  const spec = {
    ...BASE,
    title: { text: title, anchor: 'start', color: INK },
    description: describeTrends(shown),
    vconcat: shown.map((t, i) => ({
      width: WIDTH,
      height: 80,
      title: { text: `${t.label}${t.scope === 'instrument' ? '' : ` (${t.scope})`}`, fontSize: 11, anchor: 'start' },
      data: { values: t.points.map((p) => ({ tMs: p.epochMs, value: p.value })) },
      mark: { type: 'line', color: SERIES_COLOURS[i % SERIES_COLOURS.length], point: { filled: true, size: 14 } },
      encoding: {
        x: {
          field: 'tMs',
          type: 'temporal',
          scale: { type: 'utc' },
          axis: { title: i === shown.length - 1 ? 'acquisition time (UTC)' : null, format: '%Y-%m-%d', labelAngle: 0 },
        },
        y: {
          field: 'value',
          type: 'quantitative',
          scale: { zero: false },
          title: t.unit === '' ? 'dimensionless' : t.unit,
        },
      },
    })),
  };
  return spec as TopLevelSpec;
}
