// Control-chart data and its rendering: EWMA and CUSUM against an independent numpy computation
// (test/reference/output/ewma_cusum_reference.py), baseline periods split at rebaselines, excluded
// runs kept out of the statistics, flags attached to their runs, and the SVG/text forms.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseRuleSet, type ControlObservation, type QcFlag } from '../../../src/qc/index.js';
import { buildControlChart } from '../../../src/output/chart-series.js';
import { controlChartFigure } from '../../../src/output/chart-figure.js';
import { controlChartText } from '../../../src/output/chart-text.js';

const RULES = parseRuleSet(
  `version: 1
controls:
  - { id: dye, match: { sampleIdPattern: "^DYE" }, targets: { controlQuantumYield: { mean: 0.5, sd: 0.01 } }, baselineRuns: 5 }
rules:
  - { id: y-ewma, metric: controlQuantumYield, scope: { control: dye }, kind: ewma, severity: warning, lambda: 0.3, limitWidth: 3 }
  - { id: y-cusum, metric: controlQuantumYield, scope: { control: dye }, kind: cusum, severity: critical, referenceSd: 0.5, decisionSd: 4 }
`,
  'test-rules.yaml',
);
const control = RULES.controls[0];
if (control === undefined) throw new Error('rule set without control');

// An in-control series (no EWMA or CUSUM signal), invented.
const VALUES = [0.503, 0.497, 0.511, 0.492, 0.505, 0.508, 0.515, 0.499, 0.488, 0.502, 0.509, 0.512];
const observations: ControlObservation[] = VALUES.map((value, i) => ({
  controlId: 'dye',
  setId: `DYE-${i}`,
  acquiredAt: `2026-11-${String(i + 1).padStart(2, '0')}T08:00:00Z`,
  metrics: { controlQuantumYield: value, meanLifetimeNs: 4 + 0.01 * Math.sin(i) },
}));

function numpyReference(values: readonly number[]): {
  ewma: number[];
  lower: number[];
  upper: number[];
  cplus: number[];
  cminus: number[];
} {
  const script = fileURLToPath(new URL('../../reference/output/ewma_cusum_reference.py', import.meta.url));
  const run = spawnSync('python3', [script], {
    input: JSON.stringify({ values, mean: 0.5, sd: 0.01, lambda: 0.3, L: 3, k: 0.5, h: 4 }),
    encoding: 'utf8',
  });
  if (run.status !== 0) throw new Error(`python3 reference failed: ${run.stderr}`);
  return JSON.parse(run.stdout) as {
    ewma: number[];
    lower: number[];
    upper: number[];
    cplus: number[];
    cminus: number[];
  };
}

describe('buildControlChart', () => {
  it('EWMA, its exact limits and the tabular CUSUM agree with numpy (Roberts 1959; Lucas & Saccucci 1990; Page 1954)', () => {
    const chart = buildControlChart({
      control,
      metric: 'controlQuantumYield',
      ruleSet: RULES,
      observations,
      baselines: [],
      flags: [],
    });
    const reference = numpyReference(VALUES);
    expect(chart.points.map((p) => p.status)).toEqual(VALUES.map(() => 'judged'));
    chart.points.forEach((point, i) => {
      expect(point.ewma).toBeCloseTo(reference.ewma[i] ?? Number.NaN, 12);
      expect(point.ewmaLower).toBeCloseTo(reference.lower[i] ?? Number.NaN, 12);
      expect(point.ewmaUpper).toBeCloseTo(reference.upper[i] ?? Number.NaN, 12);
      expect(point.cusumUpperSd).toBeCloseTo(reference.cplus[i] ?? Number.NaN, 12);
      expect(point.cusumLowerSd).toBeCloseTo(reference.cminus[i] ?? Number.NaN, 12);
      expect(point.deviationSd).toBeCloseTo(((VALUES[i] ?? 0) - 0.5) / 0.01, 12);
    });
    expect(chart.ewma).toEqual({ lambda: 0.3, limitWidth: 3, ruleId: 'y-ewma' });
    expect(chart.cusum).toEqual({ referenceSd: 0.5, decisionSd: 4, ruleId: 'y-cusum' });
  });

  it('restarts the CUSUM after a signal, as the rule does (hand-computed: k = 0.5, h = 4)', () => {
    // standardized values 3, 3 → C+ = 2.5, 5.0 (signal, > 4); next run 1 → restart: C+ = 0.5 (not 5.5).
    const shifted: ControlObservation[] = [0.53, 0.53, 0.51].map((value, i) => ({
      controlId: 'dye',
      setId: `S-${i}`,
      acquiredAt: `2026-12-0${i + 1}T08:00:00Z`,
      metrics: { controlQuantumYield: value },
    }));
    const chart = buildControlChart({
      control,
      metric: 'controlQuantumYield',
      ruleSet: RULES,
      observations: shifted,
      baselines: [],
      flags: [],
    });
    expect(chart.points.map((p) => p.cusumUpperSd)).toEqual([
      expect.closeTo(2.5, 9),
      expect.closeTo(5, 9),
      expect.closeTo(0.5, 9),
    ]);
  });

  it('splits baseline periods at a rebaseline, keeps excluded runs out of the statistics and marks flagged runs', () => {
    const OFFSETS = [0.01, -0.02, 0.03, -0.01, 0.02, 0, -0.03];
    const runs: ControlObservation[] = Array.from({ length: 14 }, (_, i) => ({
      controlId: 'dye',
      setId: `L-${i}`,
      acquiredAt: `2026-10-${String(i + 1).padStart(2, '0')}T08:00:00Z`,
      metrics: { meanLifetimeNs: (i < 7 ? 4 : 4.5) + (OFFSETS[i % 7] ?? 0) + (i === 2 ? 1 : 0) },
    }));
    const flags: QcFlag[] = [
      {
        ruleId: 'lt',
        kind: 'westgard',
        check: '1-3s',
        severity: 'critical',
        controlId: 'dye',
        metric: 'meanLifetimeNs',
        values: {},
        message: 'm',
        acquiredAt: '2026-10-13T08:00:00Z',
        setId: 'L-12',
      },
    ];
    const chart = buildControlChart({
      control,
      metric: 'meanLifetimeNs',
      ruleSet: RULES,
      observations: runs,
      flags,
      baselines: [{ controlId: 'dye', metric: 'meanLifetimeNs', fromIso: '2026-10-08T00:00:00Z' }],
      excludedSetIds: new Set(['L-2']),
    });
    expect(chart.periods).toHaveLength(2);
    expect(chart.breaks.map((b) => b.iso)).toEqual(['2026-10-08T00:00:00Z']);
    // Period 1: runs 0–6 without the excluded L-2 → the first 5 remaining (0, 1, 3, 4, 5) are the baseline.
    const first = [4.01, 3.98, 3.99, 4.02, 4.0];
    const mean = first.reduce((a, b) => a + b) / first.length;
    const sd = Math.sqrt(first.reduce((a, b) => a + (b - mean) ** 2, 0) / (first.length - 1));
    expect(chart.periods[0]?.baseline?.mean).toBeCloseTo(mean, 12);
    expect(chart.periods[0]?.baseline?.sd).toBeCloseTo(sd, 12);
    expect(chart.points.find((p) => p.setId === 'L-2')?.status).toBe('excluded');
    expect(chart.points.find((p) => p.setId === 'L-2')?.deviationSd).toBeUndefined();
    expect(chart.points.filter((p) => p.period === 1 && p.status === 'baseline')).toHaveLength(5);
    expect(chart.periods[1]?.baseline?.mean).toBeCloseTo(4.5 + (0.01 - 0.02 + 0.03 - 0.01 + 0.02) / 5, 12);
    expect(chart.points.find((p) => p.setId === 'L-12')?.flags).toEqual(['lt 1-3s']);
  });
});

describe('control chart rendering', () => {
  it('renders an SVG with title, text alternative and one symbol per run, and a text form with every run', async () => {
    const chart = buildControlChart({
      control,
      metric: 'controlQuantumYield',
      ruleSet: RULES,
      observations,
      baselines: [],
      flags: [],
    });
    const figure = await controlChartFigure(chart);
    expect(figure.warnings).toEqual([]);
    expect(figure.svg).toMatch(
      /^<svg[^>]*role="img"[^>]*><title>Control chart: dye, control yield<\/title><desc>12 runs of control dye/,
    );
    expect(figure.svg).not.toMatch(/(?:href|src)="(?:https?:)?\/\//);
    const valueMarks = /<g class="mark-symbol role-mark [^"]*"[^>]*>(.*?)<\/g>/g;
    const counts = [...figure.svg.matchAll(valueMarks)].map((m) => (m[1]?.match(/<path/g) ?? []).length);
    expect(counts).toContain(VALUES.length);
    const text = controlChartText(chart);
    expect(text.split('\n').filter((line) => line.startsWith('2026-11-'))).toHaveLength(VALUES.length);
    expect(text).toContain('mean 0.500, SD 0.010 (declared');
  });
});
