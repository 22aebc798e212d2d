// `driftlight yield` through the real binary: fluorescein in 0.1 M NaOH measured against quinine sulfate.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeSpectrumCsv } from '../../src/formats/index.js';
import { runDriftlight } from '../helpers/cli.js';
import { axisNm, gaussianBand, makeSpectrum } from '../unit/spectra/synthetic.js';

const dir = mkdtempSync(join(tmpdir(), 'driftlight-yield-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function write(name: string, content: string): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

// Detected emission ∝ Φ·(1 − 10^−A)/n² (Brouwer 2011). Φ: fluorescein 0.925 (Magde 2002), quinine 0.546 (Melhuish 1961),
// both from memory; n: 0.1 M NaOH 1.334, 0.5 M H2SO4 1.339 (REFERENCES.md, from memory).
const detected = (phi: number, a: number, n: number): number => (1e7 * phi * (1 - 10 ** -a)) / (n * n);
// 350–700 nm: the quinine band (peak 455 nm) is back to baseline at the lower edge of the window (365 nm).
const emissionAxis = axisNm(350, 700, 1);
const absorbanceAxis = axisNm(300, 550, 1);
const absorbance = (peakNm: number, peak: number): number[] =>
  absorbanceAxis.map((l) => peak * Math.exp(-((l - peakNm) ** 2) / (2 * 20 ** 2)));
const sample = write(
  'fluorescein.csv',
  writeSpectrumCsv(
    makeSpectrum('emission', emissionAxis, gaussianBand(emissionAxis, detected(0.925, 0.04, 1.334), 520, 15), {
      noiseSigma: 30,
      seed: 11,
      metadata: { excitationNm: 490, solvent: '0.1 M NaOH' },
    }),
  ),
);
const sampleAbs = write(
  'fluorescein-abs.csv',
  writeSpectrumCsv(makeSpectrum('absorbance', absorbanceAxis, absorbance(490, 0.04), { valueUnit: 'absorbance' })),
);
const reference = write(
  'quinine.csv',
  writeSpectrumCsv(
    makeSpectrum('emission', emissionAxis, gaussianBand(emissionAxis, detected(0.546, 0.05, 1.339), 455, 28), {
      noiseSigma: 30,
      seed: 12,
      metadata: { excitationNm: 350, solvent: '0.5 M H2SO4' },
    }),
  ),
);
const referenceAbs = write(
  'quinine-abs.csv',
  writeSpectrumCsv(makeSpectrum('absorbance', absorbanceAxis, absorbance(350, 0.05), { valueUnit: 'absorbance' })),
);
const files = [
  '--sample',
  sample,
  '--sample-absorbance',
  sampleAbs,
  '--reference',
  reference,
  '--reference-absorbance',
  referenceAbs,
];

describe('driftlight yield', () => {
  it('reproduces Φ(fluorescein) = 0.925 against quinine-h2so4-0.5m within twice the stated standard uncertainty', () => {
    const run = runDriftlight(['yield', ...files, '--standard', 'quinine-h2so4-0.5m', '--json']);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout) as {
      quantumYield: number;
      standardUncertainty: number;
      budget: { quantity: string }[];
      dominantContribution: string;
      warnings: string[];
    };
    expect(Math.abs(result.quantumYield - 0.925)).toBeLessThan(2 * result.standardUncertainty);
    expect(result.standardUncertainty).toBeGreaterThan(0.02); // the 4 % on the quinine value dominates
    expect(result.dominantContribution).toBe('referenceYield');
    expect(result.budget.map((l) => l.quantity)).toContain('sampleIntegral');
    expect(result.warnings.join(' ')).toMatch(/from memory/);
  });

  it('accepts a plain reference yield with an explicit reference index', () => {
    const run = runDriftlight(['yield', ...files, '--reference-yield', '0.546', '--reference-index', '1.339']);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/quantum yield 0\.9\d/);
    // Issue 15 item 2: nothing the user did not state is labelled "stated"; the integrals' u come from the spectra's noise.
    expect(run.stdout).toMatch(/sampleIntegral .*\(estimated from noise: σ = /);
    expect(run.stdout).toMatch(/referenceYield .*\(assumed zero: not stated\)/);
    expect(run.stdout).not.toMatch(/\(stated\)/);
  });

  it('refuses a reference scan cut short inside its band (issue 15 item 3), and flags it when told to', () => {
    const cut = write(
      'quinine-cut.csv',
      writeSpectrumCsv(
        makeSpectrum(
          'emission',
          axisNm(420, 700, 1),
          gaussianBand(axisNm(420, 700, 1), detected(0.546, 0.05, 1.339), 455, 28),
          { noiseSigma: 30, seed: 13, metadata: { excitationNm: 350, solvent: '0.5 M H2SO4' } },
        ),
      ),
    );
    const args = [
      'yield',
      '--sample',
      sample,
      '--sample-absorbance',
      sampleAbs,
      '--reference',
      cut,
      '--reference-absorbance',
      referenceAbs,
      '--standard',
      'quinine-h2so4-0.5m',
    ];
    const refused = runDriftlight(args);
    expect(refused.status).not.toBe(0);
    expect(refused.stderr).toContain('reference emission is not back to baseline at 420 nm (lower)');
    const flagged = runDriftlight([...args, '--band-edge-action', 'flag', '--json']);
    expect(flagged.status).toBe(0);
    expect((JSON.parse(flagged.stdout) as { flags: string[] }).flags).toContain('band-not-at-baseline');
  });

  it('integrates over the window given with --window-nm and reports it', () => {
    const run = runDriftlight([
      'yield',
      ...files,
      '--standard',
      'quinine-h2so4-0.5m',
      '--window-nm',
      '370,690',
      '--json',
    ]);
    expect(run.status).toBe(0);
    expect((JSON.parse(run.stdout) as { windowNm: number[] }).windowNm).toEqual([370, 690]);
  });
});
