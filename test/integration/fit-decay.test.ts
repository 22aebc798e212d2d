// `driftlight fit-decay` through the real binary on real files in a temp dir: JSON and text output, a
// separate IRF file, fixed parameters and ranges, and the exit codes for rejected input and usage errors.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  createSeededRandom,
  expectedDecayCounts,
  gaussianIrf,
  samplePoisson,
  simulateDecay,
} from '../../src/decay/index.js';
import { writeDecayCsv } from '../../src/formats/csv-writer.js';
import { createDecay } from '../../src/model/decay.js';
import { runDriftlight } from '../helpers/cli.js';

interface CliFit {
  converged: boolean;
  components: { tauNs: number; tauNsStdErr?: number; tauFixed: boolean }[];
  rangeNs: [number, number];
  estimator: string;
}

const directory = mkdtempSync(join(tmpdir(), 'driftlight-fit-decay-'));
afterAll(() => rmSync(directory, { recursive: true, force: true }));

const channels = 512;
const widthNs = 25 / channels;
const irf = gaussianIrf(channels, widthNs, 2, 0.2);
const irfCounts = Array.from(irf, (value) => Math.round(value * 1e5));
// Truth 3.9 ns (a fluorescein-like lifetime; REFERENCES.md, from memory), Poisson counts, seeded.
const decay = simulateDecay(
  { channels, channelWidthNs: widthNs, tauNs: [3.9], photons: 5e4, irf, backgroundPerChannel: 1 },
  createSeededRandom(1),
);
const time = (k: number): string => (k * widthNs).toFixed(6);
const withIrf = join(directory, 'dye-with-irf.csv');
writeFileSync(
  withIrf,
  ['time (ns),counts,irf', ...Array.from(decay.counts, (c, k) => `${time(k)},${c},${irfCounts[k]}`)].join('\n') + '\n',
);
const decayOnly = join(directory, 'dye.csv');
writeFileSync(
  decayOnly,
  ['time (ns),counts', ...Array.from(decay.counts, (c, k) => `${time(k)},${c}`)].join('\n') + '\n',
);
const irfOnly = join(directory, 'irf.csv');
writeFileSync(irfOnly, ['time (ns),counts', ...irfCounts.map((c, k) => `${time(k)},${c}`)].join('\n') + '\n');

describe('driftlight fit-decay', () => {
  it('fits a decay with an IRF column and prints JSON with components[].tauNs', () => {
    const run = runDriftlight(['fit-decay', withIrf, '--json']);
    expect(run.status).toBe(0);
    const fit = JSON.parse(run.stdout) as CliFit;
    expect(fit.converged).toBe(true);
    expect(fit.estimator).toBe('ml');
    const component = fit.components[0];
    expect(Math.abs((component?.tauNs ?? 0) - 3.9)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
  });

  it('takes the IRF from a separate file and prints a text report with a residual plot', () => {
    const run = runDriftlight(['fit-decay', decayOnly, '--irf', irfOnly, '--estimator', 'lsq-neyman']);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('reconvolution fit, 1 component(s), estimator lsq-neyman');
    expect(run.stdout).toContain('weighted residuals:');
    expect(run.stdout).toMatch(/^ {2}0 \|[-*!]+$/m);
  });

  it('fits the tail without any IRF', () => {
    const run = runDriftlight(['fit-decay', decayOnly, '--json']);
    expect(run.status).toBe(0);
    expect((JSON.parse(run.stdout) as { model: string }).model).toBe('tail');
  });

  it('holds --fix values and uses --range', () => {
    const run = runDriftlight(['fit-decay', withIrf, '--fix', 'tau1=3.95', '--range', '1.5:20', '--json']);
    expect(run.status).toBe(0);
    const fit = JSON.parse(run.stdout) as CliFit;
    expect(fit.components[0]?.tauNs).toBe(3.95);
    expect(fit.components[0]?.tauFixed).toBe(true);
    expect(fit.rangeNs[0]).toBeGreaterThanOrEqual(1.5);
    expect(fit.rangeNs[1]).toBeLessThanOrEqual(20);
  });

  it('exits 3 with a typed message for a rejected file', () => {
    const broken = join(directory, 'broken.csv');
    writeFileSync(broken, 'time (ns),counts\n0,1\n0.1,abc\n0.2,3\n');
    const run = runDriftlight(['fit-decay', broken]);
    expect(run.status).toBe(3);
    expect(run.stderr).toMatch(/broken\.csv.*[A-Z_]+:/);
  });

  it('exits 2 on a bad option value or a missing file', () => {
    expect(runDriftlight(['fit-decay', withIrf, '--components', 'seven']).status).toBe(2);
    expect(runDriftlight(['fit-decay', join(directory, 'missing.csv')]).status).toBe(2);
  });

  it('fits the scatter term with --scatter (issue 15.6) and says whether the fit is acceptable', () => {
    // 5,000 scattered photons (IRF-shaped) added to the 3.9 ns decay: truth scatter fraction 5,000 / (5·10⁴ + 5,000 + background) ≈ 0.08.
    const random = createSeededRandom(8);
    const irfSum = irf.reduce((a, b) => a + b, 0);
    const scattered = Array.from(
      decay.counts,
      (c, k) => c + samplePoisson((5000 * (irf[k] as number)) / irfSum, random),
    );
    const path = join(directory, 'dye-scatter.csv');
    writeFileSync(
      path,
      ['time (ns),counts,irf', ...scattered.map((c, k) => `${time(k)},${c},${irfCounts[k]}`)].join('\n') + '\n',
    );
    const withScatter = runDriftlight(['fit-decay', path, '--scatter', '--json']);
    expect(withScatter.status).toBe(0);
    const fit = JSON.parse(withScatter.stdout) as CliFit & {
      scatterFraction: number;
      freeParameters: string[];
      acceptable: boolean;
    };
    expect(fit.freeParameters).toContain('scatterCounts');
    expect(fit.scatterFraction).toBeGreaterThan(0.04);
    expect(fit.scatterFraction).toBeLessThan(0.12);
    expect(fit.acceptable).toBe(true);
    const without = JSON.parse(runDriftlight(['fit-decay', path, '--json']).stdout) as {
      freeParameters: string[];
      scatterFraction: number;
    };
    expect(without.freeParameters).not.toContain('scatterCounts');
    expect(without.scatterFraction).toBe(0);
    expect(runDriftlight(['fit-decay', path, '--scatter']).stdout).toMatch(/^ {2}acceptable {2}yes$/m);
  });

  it('takes the repetition rate from --repetition-rate-mhz (issue 17.1) and turns on --pile-up-correction (issue 17.4)', () => {
    // 4 ns at 80 MHz, window = one period (12.5 ns): truth folded from 60 single pulses, 2 counts/channel background.
    const n = 500;
    const width = 12.5 / n;
    const pulseIrf = gaussianIrf(n, width, 1.5, 0.2);
    const longIrf = new Float64Array(n * 60);
    longIrf.set(pulseIrf);
    const long = expectedDecayCounts({
      channels: n * 60,
      channelWidthNs: width,
      tauNs: [4],
      photons: 1e5,
      irf: longIrf,
    });
    const expected = new Float64Array(n).fill(2);
    for (let k = 0; k < long.length; k++) expected[k % n] = (expected[k % n] as number) + (long[k] as number);
    const random = createSeededRandom(5);
    const counts = Float64Array.from(expected, (mean) => samplePoisson(mean, random));
    const path = join(directory, 'dye-80mhz.csv');
    const timeNs = Float64Array.from({ length: n }, (_unused, k) => Number((k * width).toPrecision(12)));
    const irfColumn = Float64Array.from(pulseIrf, (value) => Math.round(value * 1e5));
    writeFileSync(
      path,
      writeDecayCsv(
        createDecay({ timeNs, counts, channelWidthNs: width, irfCounts: irfColumn, metadata: { collectionTimeS: 1 } }),
      ),
    );
    const unknown = JSON.parse(runDriftlight(['fit-decay', path, '--json']).stdout) as {
      acceptable: boolean;
      warnings: string[];
    };
    expect(unknown.acceptable).toBe(false);
    expect(unknown.warnings.some((w) => w.includes('--repetition-rate-mhz'))).toBe(true);
    const known = runDriftlight(['fit-decay', path, '--repetition-rate-mhz', '80', '--pile-up-correction', '--json']);
    expect(known.status).toBe(0);
    const fit = JSON.parse(known.stdout) as CliFit & {
      acceptable: boolean;
      pileUpCorrected: boolean;
      warnings: string[];
    };
    expect(fit.acceptable).toBe(true);
    expect(fit.pileUpCorrected).toBe(true);
    expect(fit.warnings.some((w) => w.startsWith('light from earlier pulses'))).toBe(false);
    expect(Math.abs((fit.components[0]?.tauNs ?? 0) - 4)).toBeLessThan(3 * (fit.components[0]?.tauNsStdErr ?? 0));
    expect(runDriftlight(['fit-decay', path, '--repetition-rate-mhz', '-3']).status).toBe(2);
  });

  it('places a separate IRF file by its own time axis (issue 15.7): finer is resampled, coarser exits 3 with IRF_AXIS_MISMATCH', () => {
    // The same Gaussian IRF (centre 2 ns, FWHM 0.2 ns) integrated on 25 ps channels from −1 ns: truth on the decay's channels is `irf`.
    const fineWidth = 0.0125;
    const fine = gaussianIrf(4 * channels, fineWidth, 3, 0.2);
    const finePath = join(directory, 'irf-fine.csv');
    writeFileSync(
      finePath,
      [
        'time (ns),counts',
        ...Array.from(fine, (v, k) => `${(-1 + k * fineWidth).toFixed(6)},${Math.round(v * 1e5)}`),
      ].join('\n') + '\n',
    );
    const run = runDriftlight(['fit-decay', decayOnly, '--irf', finePath, '--json']);
    expect(run.status).toBe(0);
    const fit = JSON.parse(run.stdout) as CliFit & { warnings: string[]; shiftNs: number };
    expect(fit.warnings[0]).toMatch(/^the IRF was resampled .* and placed by its own time axis/);
    expect(Math.abs((fit.components[0]?.tauNs ?? 0) - 3.9)).toBeLessThan(3 * (fit.components[0]?.tauNsStdErr ?? 0));
    expect(Math.abs(fit.shiftNs)).toBeLessThan(0.02);
    const coarsePath = join(directory, 'irf-coarse.csv');
    const coarse = gaussianIrf(channels / 4, 4 * widthNs, 2, 0.2);
    writeFileSync(
      coarsePath,
      [
        'time (ns),counts',
        ...Array.from(coarse, (v, k) => `${(k * 4 * widthNs).toFixed(6)},${Math.round(v * 1e5)}`),
      ].join('\n') + '\n',
    );
    const refused = runDriftlight(['fit-decay', decayOnly, '--irf', coarsePath]);
    expect(refused.status).toBe(3);
    expect(refused.stderr).toMatch(/irf-coarse\.csv.*IRF_AXIS_MISMATCH/);
    expect(refused.stderr).toMatch(/finer channels/);
  });
});
