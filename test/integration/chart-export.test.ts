// `driftlight chart` and `driftlight export` as a user runs them, on the demo day plus an invented QC
// history: the chart's text, SVG and HTML forms, and the summary table read back with a CSV parser and
// checked against the result files and the rate-constant relations.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { runDriftlight } from '../helpers/cli.js';
import { faceWorkspace } from '../helpers/face-workspace.js';

let dir = '';
let config = '';

beforeAll(() => {
  ({ dir, config } = faceWorkspace());
});

function resultFiles(): { path: string; result: AnalysisResult }[] {
  const root = join(dir, 'results');
  return readdirSync(root).flatMap((day) =>
    readdirSync(join(root, day))
      .filter((n) => n.endsWith('.json'))
      .map((name) => ({
        path: `${day}/${name}`,
        result: JSON.parse(readFileSync(join(root, day, name), 'utf8')) as AnalysisResult,
      })),
  );
}

describe('driftlight chart', () => {
  it('prints one line per run with the baseline of each period and the flags', () => {
    const run = runDriftlight(['chart', 'teal', '--metric', 'controlQuantumYield', '-c', config]);
    expect(run.status, run.stderr).toBe(0);
    // 30 seeded runs plus the demo day's own control run.
    expect(run.stdout.split('\n').filter((line) => /^\d{4}-\d{2}-\d{2} \d{2}:\d{2}/.test(line))).toHaveLength(31);
    expect(run.stdout).toContain('mean 0.800, SD 0.030 (declared');
    expect(run.stdout).toMatch(/yield-westgard 4-1s, yield-ewma EWMA, yield-cusum upper CUSUM/);
    const lifetime = runDriftlight(['chart', 'teal', '--metric', 'meanLifetimeNs', '-c', config]);
    expect(lifetime.stdout).toContain('── rebaseline from 2026-11-20T08:00:00.000Z');
  });

  it('writes an SVG and a self-contained HTML page; an unknown control is a usage error', () => {
    const svg = join(dir, 'teal.svg');
    expect(runDriftlight(['chart', 'teal', '--metric', 'controlQuantumYield', '--out', svg, '-c', config]).status).toBe(
      0,
    );
    expect(readFileSync(svg, 'utf8')).toMatch(/^<svg[^>]*><title>Control chart: teal, control yield<\/title>/);
    const html = join(dir, 'teal.html');
    const run = runDriftlight(['chart', 'teal', '--days', '400', '--out', html, '-c', config]);
    expect(run.stdout).toMatch(/wrote .*teal.html \(\d+ charts\)/);
    const page = readFileSync(html, 'utf8');
    expect(page).not.toMatch(/<script|(?:href|src)="(?:https?:)?\/\//);
    const unknown = runDriftlight(['chart', 'nope', '-c', config]);
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toMatch(/no control "nope".*known: teal/);
  });
});

describe('driftlight export', () => {
  it('CSV read back by a CSV parser: one row per result file, numbers as in the result, k_r = Φ/τ, k_nr = (1 − Φ)/τ, τ0 = τ/Φ', () => {
    const run = runDriftlight(['export', '--since', '2026-01-01', '--format', 'csv', '-c', config]);
    expect(run.status, run.stderr).toBe(0);
    const rows = parse<Record<string, string>>(run.stdout, { columns: true, skip_empty_lines: true });
    const files = resultFiles();
    expect(rows).toHaveLength(files.length);
    let withRates = 0;
    for (const { path, result } of files) {
      const row = rows.find((r) => r['set_id'] === result.setId);
      expect(row, result.setId).toBeDefined();
      if (row === undefined) continue;
      expect(row['result_path']).toBe(path);
      expect(row['sample_id']).toBe(result.sampleId);
      expect(row['quantum_yield']).toBe(result.quantumYield === undefined ? '' : String(result.quantumYield.value));
      expect(row['tau_mean_intensity_ns']).toBe(
        result.decayFit === undefined ? '' : String(result.decayFit.tauMeanIntensityNs),
      );
      if (row['kr_per_s'] !== '') {
        withRates += 1;
        const phi = Number(row['quantum_yield']);
        const tauS = Number(row['tau_mean_intensity_ns']) * 1e-9;
        // Textbook relations (Birks, Photophysics of Aromatic Molecules, 1970; Lakowicz, Principles of Fluorescence Spectroscopy, 3rd ed., eq. 1.1–1.2).
        expect(Number(row['kr_per_s']) / (phi / tauS)).toBeCloseTo(1, 9);
        expect(Number(row['knr_per_s']) / ((1 - phi) / tauS)).toBeCloseTo(1, 9);
        expect(Number(row['tau0_ns']) / (Number(row['tau_mean_intensity_ns']) / phi)).toBeCloseTo(1, 9);
      }
    }
    expect(withRates).toBeGreaterThanOrEqual(3);
  });

  it('JSON has the same rows; --since after every set gives an empty table', () => {
    const run = runDriftlight(['export', '--since', '2026-01-01', '--format', 'json', '-c', config]);
    const parsed = JSON.parse(run.stdout) as { schema: string; rows: unknown[] };
    expect(parsed.schema).toBe('driftlight.summary/1');
    expect(parsed.rows).toHaveLength(resultFiles().length);
    const none = runDriftlight(['export', '--since', '2030-01-01', '-c', config]);
    expect(none.stdout.trim().split('\r\n')).toHaveLength(1);
  });
});
