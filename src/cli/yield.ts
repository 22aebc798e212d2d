// `driftlight yield`: relative fluorescence quantum yield of a sample against a reference (standard id or a
// given yield) from corrected emission spectra and absorbance spectra, with the GUM uncertainty budget.
import type { Command } from 'commander';
import { ConfigInvalid, InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import {
  findSolvent,
  findStandard,
  relativeQuantumYield,
  standardWarnings,
  type QuantumYieldStandard,
} from '../photophysics/index.js';
import { integralWithUncertainty, interpolateAt } from '../spectra/index.js';
import type { CommandModule } from './command-module.js';
import { finiteNumber, readSpectrumFile, toJson } from './correct.js';

interface YieldCliOptions {
  readonly sample: string;
  readonly sampleAbsorbance: string;
  readonly reference: string;
  readonly referenceAbsorbance: string;
  readonly standard?: string;
  readonly referenceYield?: number;
  readonly referenceYieldUncertainty?: number;
  readonly sampleIndex?: number;
  readonly referenceIndex?: number;
  readonly excitationNm?: number;
  readonly detectorUncertainty?: number;
  readonly json?: boolean;
}

function absorbanceAt(spectrum: Spectrum, excitationNm: number, file: string): number {
  const value = interpolateAt(spectrum.wavelengthNm, spectrum.values, excitationNm);
  if (value === undefined) {
    throw new InputRejected('AXIS_NOT_COVERED', `the absorbance spectrum does not include the excitation wavelength ${excitationNm} nm`, { file });
  }
  const pathCm = spectrum.metadata.pathLengthCm ?? 1;
  return value / pathCm;
}

function refractiveIndex(flag: number | undefined, spectrum: Spectrum, fallback: number | undefined, role: string): { value: number; from: string } {
  if (flag !== undefined) return { value: flag, from: 'option' };
  const solvent = spectrum.metadata.solvent;
  const row = solvent === undefined ? undefined : findSolvent(solvent);
  if (row !== undefined) return { value: row.refractiveIndex, from: `solvent "${solvent}" (${row.status})` };
  if (fallback !== undefined) return { value: fallback, from: 'standard' };
  throw new ConfigInvalid(`the ${role} refractive index is unknown: give --${role}-index N or a known solvent in the file metadata`, { configPath: `--${role}-index` });
}

function runYield(options: YieldCliOptions): void {
  if ((options.standard === undefined) === (options.referenceYield === undefined)) {
    throw new ConfigInvalid('give exactly one of --standard ID or --reference-yield PHI', { configPath: '--standard' });
  }
  const standard: QuantumYieldStandard | undefined = options.standard === undefined ? undefined : findStandard(options.standard);
  const sample = readSpectrumFile(options.sample, 'emission');
  const reference = readSpectrumFile(options.reference, 'emission');
  const sampleAbsorbanceSpectrum = readSpectrumFile(options.sampleAbsorbance, 'absorbance');
  const referenceAbsorbanceSpectrum = readSpectrumFile(options.referenceAbsorbance, 'absorbance');
  const excitationNm = options.excitationNm ?? sample.metadata.excitationNm ?? reference.metadata.excitationNm;
  if (excitationNm === undefined) {
    throw new ConfigInvalid('the excitation wavelength is unknown: give --excitation-nm or put it in the sample file', { configPath: '--excitation-nm' });
  }
  const warnings: string[] = [];
  const referenceExcitationNm = reference.metadata.excitationNm;
  if (options.excitationNm === undefined && referenceExcitationNm !== undefined && Math.abs(referenceExcitationNm - excitationNm) > 1) {
    warnings.push(`sample excited at ${excitationNm} nm, reference at ${referenceExcitationNm} nm: the excitation intensity ratio must be corrected separately`);
  }
  if (standard !== undefined) warnings.push(...standardWarnings(standard, referenceExcitationNm ?? excitationNm));
  const sampleIndex = refractiveIndex(options.sampleIndex, sample, undefined, 'sample');
  const referenceIndex = refractiveIndex(options.referenceIndex, reference, standard?.refractiveIndex, 'reference');
  const sampleIntegral = integralWithUncertainty(sample);
  const referenceIntegral = integralWithUncertainty(reference);
  const referenceYield = standard?.quantumYield ?? (options.referenceYield as number);
  const referenceYieldUncertainty = options.referenceYieldUncertainty ?? standard?.standardUncertainty;
  const result = relativeQuantumYield({
    sampleIntegral: sampleIntegral.integral,
    referenceIntegral: referenceIntegral.integral,
    sampleAbsorbance: absorbanceAt(sampleAbsorbanceSpectrum, excitationNm, options.sampleAbsorbance),
    referenceAbsorbance: absorbanceAt(referenceAbsorbanceSpectrum, referenceExcitationNm ?? excitationNm, options.referenceAbsorbance),
    sampleRefractiveIndex: sampleIndex.value,
    referenceRefractiveIndex: referenceIndex.value,
    referenceYield,
    uncertainties: {
      ...(referenceYieldUncertainty === undefined ? {} : { referenceYield: referenceYieldUncertainty }),
      ...(sampleIntegral.standardUncertainty === undefined ? {} : { sampleIntegral: sampleIntegral.standardUncertainty }),
      ...(referenceIntegral.standardUncertainty === undefined ? {} : { referenceIntegral: referenceIntegral.standardUncertainty }),
      ...(options.detectorUncertainty === undefined ? {} : { detectorCorrectionRelative: options.detectorUncertainty }),
    },
  });
  const allWarnings = [...warnings, ...result.warnings];
  if (options.json === true) {
    process.stdout.write(
      `${toJson({
        quantumYield: result.quantumYield,
        standardUncertainty: result.standardUncertainty,
        budget: result.budget,
        dominantContribution: result.dominantContribution,
        excitationNm,
        referenceYield,
        ...(standard === undefined ? {} : { standard: standard.id, standardStatus: standard.status }),
        sampleRefractiveIndex: sampleIndex,
        referenceRefractiveIndex: referenceIndex,
        warnings: allWarnings,
      })}\n`,
    );
    return;
  }
  const lines = [
    `quantum yield ${result.quantumYield.toFixed(4)} ± ${result.standardUncertainty.toFixed(4)} (standard uncertainty; dominant: ${result.dominantContribution})`,
    'budget (quantity, value, u, |c·u|, share of variance):',
    ...result.budget.map(
      (l) => `  ${l.quantity.padEnd(26)} ${l.value.toPrecision(6).padStart(12)} ${l.standardUncertainty.toPrecision(3).padStart(10)} ${l.contribution.toPrecision(3).padStart(10)} ${(100 * l.varianceShare).toFixed(1).padStart(5)} %  (${l.basis})`,
    ),
    ...allWarnings.map((w) => `warning: ${w}`),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}

export const yieldCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('yield')
      .description('Relative fluorescence quantum yield Φ = Φr·(F/Fr)·(fr/f)·(n²/nr²), f = 1 − 10^(−A) (Brouwer 2011), with an uncertainty budget. Spectra must already be corrected.')
      .requiredOption('--sample <file>', 'corrected emission spectrum of the sample')
      .requiredOption('--sample-absorbance <file>', 'absorbance spectrum of the sample')
      .requiredOption('--reference <file>', 'corrected emission spectrum of the reference')
      .requiredOption('--reference-absorbance <file>', 'absorbance spectrum of the reference')
      .option('--standard <id>', 'reference standard id (e.g. quinine-h2so4-0.5m, fluorescein-naoh-0.1m)')
      .option('--reference-yield <phi>', 'reference quantum yield, when not a tabulated standard', finiteNumber)
      .option('--reference-yield-uncertainty <u>', 'standard uncertainty of the reference yield', finiteNumber)
      .option('--sample-index <n>', 'refractive index of the sample solvent (default: from the solvent in the file)', finiteNumber)
      .option('--reference-index <n>', 'refractive index of the reference solvent (default: standard or file solvent)', finiteNumber)
      .option('--excitation-nm <nm>', 'excitation wavelength in nm (default: from the sample file)', finiteNumber)
      .option('--detector-uncertainty <relative>', 'relative standard uncertainty of the detector-correction ratio', finiteNumber)
      .option('--json', 'print the result as JSON')
      .action((options: YieldCliOptions) => {
        runYield(options);
      });
  },
};
