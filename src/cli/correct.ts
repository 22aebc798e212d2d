// `driftlight correct SPECTRUM`: applies the spectral corrections (reference channel, blank, detector curve,
// inner filter) to one emission spectrum, prints metrics and the correction records, and writes the result.
import { readFileSync, writeFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { readData, writeSpectrumCsv, writeSpectrumJcamp } from '../formats/index.js';
import { formatSignificant } from '../model/format-number.js';
import { ConfigInvalid, InputRejected } from '../model/errors.js';
import type { Spectrum, SpectrumKind } from '../model/spectrum.js';
import {
  applyDetectorCorrection,
  correctInnerFilter,
  findReferenceChannel,
  normalizeByReferenceChannel,
  spectrumMetrics,
  subtractBlank,
  type CorrectionRecord,
  type CorrectionResult,
} from '../spectra/index.js';
import type { CommandModule } from './command-module.js';

/** Reads one spectrum file at the edge (readData from src/formats); throws InputRejected naming the file. */
export function readSpectrumFile(path: string, kindHint: SpectrumKind): Spectrum {
  let content: Uint8Array;
  try {
    content = readFileSync(path);
  } catch (error) {
    throw new InputRejected('EMPTY_FILE', `cannot read ${path}: ${(error as Error).message}`, {
      file: path,
      hint: 'Check the path and permissions.',
    });
  }
  const parsed = readData(content, { fileName: path, kindHint });
  if (parsed.type !== 'spectrum')
    throw new InputRejected('UNKNOWN_LAYOUT', 'expected a spectrum but found a decay histogram', { file: path });
  return parsed.spectrum;
}

/** JSON text of a result: typed arrays as arrays, non-finite numbers as null. */
export function toJson(value: unknown): string {
  return JSON.stringify(
    value,
    (_key, v: unknown) =>
      ArrayBuffer.isView(v) && !(v instanceof DataView)
        ? Array.from(v as Float64Array)
        : typeof v === 'number' && !Number.isFinite(v)
          ? null
          : v,
    2,
  );
}

/** A finite number parser for commander options. */
export function finiteNumber(text: string): number {
  const value = Number(text);
  if (!Number.isFinite(value)) throw new InvalidArgumentError('expected a number');
  return value;
}

interface CorrectCliOptions {
  readonly blank?: string;
  readonly detectorCurve?: string;
  readonly detectorCurveMeaning: string;
  readonly absorbance?: string;
  readonly innerFilter?: 'centred' | 'geometric';
  readonly excitationNm?: number;
  readonly out?: string;
  readonly json?: boolean;
}

function runCorrect(path: string, options: CorrectCliOptions): void {
  let spectrum = readSpectrumFile(path, 'emission');
  const records: CorrectionRecord[] = [];
  const apply = (result: CorrectionResult): void => {
    spectrum = result.spectrum;
    records.push(result.record);
  };
  if (findReferenceChannel(spectrum) !== undefined) apply(normalizeByReferenceChannel(spectrum));
  if (options.blank !== undefined) {
    let blank = readSpectrumFile(options.blank, 'blank');
    if (records.length > 0 && findReferenceChannel(blank) !== undefined)
      blank = normalizeByReferenceChannel(blank).spectrum;
    apply(subtractBlank(spectrum, blank));
  }
  const curveMeaning = options.detectorCurveMeaning;
  if (curveMeaning !== 'from-header' && curveMeaning !== 'multiply' && curveMeaning !== 'divide') {
    throw new ConfigInvalid(`--detector-curve-meaning must be from-header, multiply or divide, not "${curveMeaning}"`, {
      configPath: '--detector-curve-meaning',
    });
  }
  if (options.detectorCurve !== undefined)
    apply(
      applyDetectorCorrection(spectrum, readSpectrumFile(options.detectorCurve, 'detector-correction'), {
        curveMeaning,
      }),
    );
  if (options.absorbance !== undefined) {
    const absorbance = readSpectrumFile(options.absorbance, 'absorbance');
    apply(
      correctInnerFilter(spectrum, absorbance, {
        method: options.innerFilter ?? 'centred',
        ...(options.excitationNm === undefined ? {} : { excitationNm: options.excitationNm }),
      }),
    );
  } else if (options.innerFilter !== undefined) {
    throw new ConfigInvalid('--inner-filter needs --absorbance FILE (the sample absorbance spectrum)', {
      configPath: '--inner-filter',
    });
  }
  if (options.out !== undefined) {
    const extension = extname(options.out).toLowerCase();
    if (extension === '.csv') writeFileSync(options.out, writeSpectrumCsv(spectrum));
    else if (extension === '.jdx' || extension === '.dx') writeFileSync(options.out, writeSpectrumJcamp(spectrum));
    else
      throw new ConfigInvalid(`--out must end in .csv or .jdx, got "${basename(options.out)}"`, {
        configPath: '--out',
      });
  }
  const metrics = spectrumMetrics(spectrum);
  if (options.json === true) {
    process.stdout.write(
      `${toJson({ file: path, corrections: records, metrics, ...(options.out === undefined ? {} : { out: options.out }) })}\n`,
    );
    return;
  }
  const lines = [
    `${path}: ${records.length} correction(s) applied`,
    ...records.map(
      (r, i) => `  ${i + 1}. ${r.name}${r.warnings.length > 0 ? ` (warnings: ${r.warnings.join('; ')})` : ''}`,
    ),
    `peak ${formatSignificant(metrics.peakWavelengthNm, 5)} nm, FWHM ${metrics.fwhmNm === undefined ? 'n/a' : `${formatSignificant(metrics.fwhmNm, 3)} nm`}, ` +
      `centroid ${formatSignificant(metrics.centroidNm, 5)} nm, integral ${formatSignificant(metrics.integratedIntensity, 4)} ${spectrum.valueUnit}·nm`,
    ...metrics.warnings.map((w) => `warning: ${w}`),
    ...(options.out === undefined ? [] : [`written: ${options.out}`]),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}

export const correctCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('correct')
      .description(
        'Correct an emission spectrum (reference channel, solvent blank, detector curve, inner filter) and report its metrics.',
      )
      .argument('<spectrum>', 'emission spectrum file (CSV/TSV, JCAMP-DX or driftlight JSON)')
      .option(
        '--blank <file>',
        'solvent blank at the same excitation wavelength (subtracted; removes the solvent Raman band)',
      )
      .option(
        '--detector-curve <file>',
        'detector curve vs wavelength: correction factors (multiplied) or relative response (divided); never extrapolated',
      )
      .option(
        '--detector-curve-meaning <how>',
        'multiply (correction factors), divide (relative response / sensitivity) or from-header (read it from the curve; refused when it does not tell)',
        'from-header',
      )
      .option('--absorbance <file>', 'absorbance spectrum of the sample, for the inner-filter correction')
      .option(
        '--inner-filter <method>',
        'inner-filter form: centred (10^((Aex+Aem)/2)) or geometric (viewed zone 0.4–0.6 cm); default centred',
        (text: string) => {
          if (text !== 'centred' && text !== 'geometric')
            throw new InvalidArgumentError('expected centred or geometric');
          return text;
        },
      )
      .option('--excitation-nm <nm>', 'excitation wavelength in nm (default: from the file metadata)', finiteNumber)
      .option('--out <file>', 'write the corrected spectrum (.csv or .jdx)')
      .option('--json', 'print the corrections and metrics as JSON')
      .action((path: string, options: CorrectCliOptions) => {
        runCorrect(path, options);
      });
  },
};
