// `driftlight correct` through the real binary on spectra written to a temp dir by the real CSV writer.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readData, writeSpectrumCsv } from '../../src/formats/index.js';
import { geometricInnerFilterFactor } from '../../src/spectra/inner-filter.js';
import { integrateIntensity } from '../../src/spectra/metrics.js';
import { ramanPeakNm } from '../../src/spectra/raman.js';
import { runDriftlight } from '../helpers/cli.js';
import { axisNm, gaussianBand, makeSpectrum } from '../unit/spectra/synthetic.js';

const dir = mkdtempSync(join(tmpdir(), 'driftlight-correct-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const axis = axisNm(370, 560, 0.5);
const blankAxis = axisNm(360, 580, 1);
const solvent = (x: readonly number[]): number[] => gaussianBand(x, 500, ramanPeakNm(350), 3).map((v) => v + 20);
const dyeAreaCountsNm = 20000;
const dye = gaussianBand(axis, dyeAreaCountsNm, 450, 20);
const absorbanceAtExcitation = 0.04;
const absorbanceAxis = axisNm(300, 600, 1);

function write(name: string, content: string): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

const samplePath = write(
  'sample.csv',
  writeSpectrumCsv(
    makeSpectrum(
      'emission',
      axis,
      dye.map((v, i) => v + (solvent(axis)[i] as number)),
      { metadata: { excitationNm: 350 } },
    ),
  ),
);
const blankPath = write(
  'blank.csv',
  writeSpectrumCsv(makeSpectrum('blank', blankAxis, solvent(blankAxis), { metadata: { excitationNm: 350 } })),
);
const curvePath = write(
  'curve.csv',
  writeSpectrumCsv(
    makeSpectrum(
      'detector-correction',
      absorbanceAxis,
      absorbanceAxis.map(() => 2),
      { valueUnit: 'factor' },
    ),
  ),
);
// A narrow absorption band at 350 nm that is zero over the emission range (no re-absorption).
const absorbancePath = write(
  'absorbance.csv',
  writeSpectrumCsv(
    makeSpectrum(
      'absorbance',
      absorbanceAxis,
      absorbanceAxis.map((l) => absorbanceAtExcitation * Math.exp(-((l - 350) ** 2) / (2 * 4 ** 2))),
      { valueUnit: 'absorbance' },
    ),
  ),
);

describe('driftlight correct', () => {
  it('applies blank, detector curve and geometric inner filter in order, records them and writes the result', () => {
    const outPath = join(dir, 'corrected.csv');
    const run = runDriftlight([
      'correct',
      samplePath,
      '--blank',
      blankPath,
      '--detector-curve',
      curvePath,
      '--absorbance',
      absorbancePath,
      '--inner-filter',
      'geometric',
      '--out',
      outPath,
      '--json',
    ]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const report = JSON.parse(run.stdout) as {
      corrections: { name: string; inputs: Record<string, string> }[];
      metrics: { peakWavelengthNm: number };
    };
    expect(report.corrections.map((c) => c.name)).toEqual([
      'subtractBlank',
      'applyDetectorCorrection',
      'correctInnerFilter',
    ]);
    expect(report.corrections[0]?.inputs['blank']).toMatch(/^[0-9a-f]{64}$/);
    expect(report.metrics.peakWavelengthNm).toBeCloseTo(450, 0);
    const parsed = readData(readFileSync(outPath), { fileName: outPath });
    if (parsed.type !== 'spectrum') throw new Error('expected a spectrum');
    // Expected integral: dye area × curve factor 2 × Parker–Rees factor at A = 0.04 over 0.4–0.6 cm (Parker & Rees 1962).
    const expected = dyeAreaCountsNm * 2 * geometricInnerFilterFactor(absorbanceAtExcitation, 0.4, 0.6);
    expect(integrateIntensity(parsed.spectrum) / expected).toBeCloseTo(1, 2);
  });

  it('refuses a detector curve that does not cover the spectrum (exit 3, AXIS_NOT_COVERED)', () => {
    const shortCurve = write(
      'short-curve.csv',
      writeSpectrumCsv(
        makeSpectrum(
          'detector-correction',
          axisNm(400, 500, 5),
          axisNm(400, 500, 5).map(() => 1),
        ),
      ),
    );
    const run = runDriftlight(['correct', samplePath, '--detector-curve', shortCurve]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain('AXIS_NOT_COVERED');
  });

  it('refuses a detector curve that does not say whether to multiply or divide, unless told (issue 15 item 5)', () => {
    const silentCurve = write(
      'silent-curve.csv',
      writeSpectrumCsv(
        makeSpectrum(
          'detector-correction',
          absorbanceAxis,
          absorbanceAxis.map(() => 2),
          { valueUnit: 'a.u.' },
        ),
      ),
    );
    const refused = runDriftlight(['correct', samplePath, '--detector-curve', silentCurve]);
    expect(refused.status).toBe(3);
    expect(refused.stderr).toContain('does not say whether it holds correction factors');
    expect(refused.stderr).toContain('--detector-curve-meaning');
    const told = runDriftlight([
      'correct',
      samplePath,
      '--detector-curve',
      silentCurve,
      '--detector-curve-meaning',
      'divide',
      '--json',
    ]);
    expect(told.status).toBe(0);
    const report = JSON.parse(told.stdout) as { corrections: { parameters: Record<string, unknown> }[] };
    expect(report.corrections[0]?.parameters['curveMeaning']).toBe('divide');
  });

  it('refuses a blank measured at another excitation wavelength (exit 3, EXCITATION_MISMATCH)', () => {
    const otherBlank = write(
      'blank-360.csv',
      writeSpectrumCsv(makeSpectrum('blank', blankAxis, solvent(blankAxis), { metadata: { excitationNm: 360 } })),
    );
    const run = runDriftlight(['correct', samplePath, '--blank', otherBlank]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain('EXCITATION_MISMATCH');
  });

  it('refuses an inner-filter correction above A = 1.5 with exit 3 (docs/spectra.md; issue 17 item 5)', () => {
    const dense = write(
      'absorbance-dense.csv',
      writeSpectrumCsv(
        makeSpectrum(
          'absorbance',
          absorbanceAxis,
          absorbanceAxis.map(() => 2),
          { valueUnit: 'absorbance' },
        ),
      ),
    );
    const run = runDriftlight(['correct', samplePath, '--absorbance', dense, '--inner-filter', 'centred']);
    expect(run.stderr).toContain('OUT_OF_RANGE');
    expect(run.status).toBe(3);
  });
});
