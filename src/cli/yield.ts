// `driftlight yield`: relative fluorescence quantum yield of a sample against a reference (standard id or a
// given yield) from corrected emission spectra and absorbance spectra, with the GUM uncertainty budget.
import type { Command } from 'commander';
import { ConfigInvalid, InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import { formatSignificant } from '../model/format-number.js';
import {
  findSolvent,
  findStandard,
  quantumYieldFromSpectra,
  standardUncertaintyBasis,
  standardWarnings,
  type LabelledUncertainty,
  type QuantumYieldStandard,
} from '../photophysics/index.js';
import { defaultIntegrationWindow, interpolateAt } from '../spectra/index.js';
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
  readonly windowNm?: readonly [number, number];
  readonly scatterExclusionNm: number;
  readonly bandEdgeFraction: number;
  readonly bandEdgeAction: string;
  readonly json?: boolean;
}

/** Parses "FROM,TO" (nm) for --window-nm. */
function windowOption(text: string): [number, number] {
  const parts = text.split(',').map((p) => Number(p.trim()));
  const [from, to] = parts;
  if (
    parts.length !== 2 ||
    from === undefined ||
    to === undefined ||
    !Number.isFinite(from) ||
    !Number.isFinite(to) ||
    !(to > from)
  ) {
    throw new ConfigInvalid(`--window-nm "${text}" is not FROM,TO in nm with FROM < TO`, { configPath: '--window-nm' });
  }
  return [from, to];
}

function absorbanceAt(spectrum: Spectrum, excitationNm: number, file: string): number {
  const value = interpolateAt(spectrum.wavelengthNm, spectrum.values, excitationNm);
  if (value === undefined) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the absorbance spectrum does not include the excitation wavelength ${excitationNm} nm`,
      { file },
    );
  }
  const pathCm = spectrum.metadata.pathLengthCm ?? 1;
  return value / pathCm;
}

function refractiveIndex(
  flag: number | undefined,
  spectrum: Spectrum,
  fallback: number | undefined,
  role: string,
): { value: number; from: string } {
  if (flag !== undefined) return { value: flag, from: 'option' };
  const solvent = spectrum.metadata.solvent;
  const row = solvent === undefined ? undefined : findSolvent(solvent);
  if (row !== undefined) return { value: row.refractiveIndex, from: `solvent "${solvent}" (${row.status})` };
  if (fallback !== undefined) return { value: fallback, from: 'standard' };
  throw new ConfigInvalid(
    `the ${role} refractive index is unknown: give --${role}-index N or a known solvent in the file metadata`,
    { configPath: `--${role}-index` },
  );
}

function runYield(options: YieldCliOptions): void {
  if ((options.standard === undefined) === (options.referenceYield === undefined)) {
    throw new ConfigInvalid('give exactly one of --standard ID or --reference-yield PHI', { configPath: '--standard' });
  }
  const standard: QuantumYieldStandard | undefined =
    options.standard === undefined ? undefined : findStandard(options.standard);
  const sample = readSpectrumFile(options.sample, 'emission');
  const reference = readSpectrumFile(options.reference, 'emission');
  const sampleAbsorbanceSpectrum = readSpectrumFile(options.sampleAbsorbance, 'absorbance');
  const referenceAbsorbanceSpectrum = readSpectrumFile(options.referenceAbsorbance, 'absorbance');
  const excitationNm = options.excitationNm ?? sample.metadata.excitationNm ?? reference.metadata.excitationNm;
  if (excitationNm === undefined) {
    throw new ConfigInvalid('the excitation wavelength is unknown: give --excitation-nm or put it in the sample file', {
      configPath: '--excitation-nm',
    });
  }
  const warnings: string[] = [];
  const referenceExcitationNm = reference.metadata.excitationNm;
  if (
    options.excitationNm === undefined &&
    referenceExcitationNm !== undefined &&
    Math.abs(referenceExcitationNm - excitationNm) > 1
  ) {
    warnings.push(
      `sample excited at ${excitationNm} nm, reference at ${referenceExcitationNm} nm: the excitation intensity ratio must be corrected separately`,
    );
  }
  if (standard !== undefined) warnings.push(...standardWarnings(standard, referenceExcitationNm ?? excitationNm));
  const sampleIndex = refractiveIndex(options.sampleIndex, sample, undefined, 'sample');
  const referenceIndex = refractiveIndex(options.referenceIndex, reference, standard?.refractiveIndex, 'reference');
  const referenceYield = standard?.quantumYield ?? options.referenceYield;
  if (referenceYield === undefined) {
    throw new ConfigInvalid('give exactly one of --standard ID or --reference-yield PHI', { configPath: '--standard' });
  }
  const referenceYieldUncertainty: LabelledUncertainty | undefined =
    options.referenceYieldUncertainty !== undefined
      ? { value: options.referenceYieldUncertainty, basis: 'stated by the user (--reference-yield-uncertainty)' }
      : standard === undefined
        ? undefined
        : { value: standard.standardUncertainty, basis: standardUncertaintyBasis(standard) };
  if (options.bandEdgeAction !== 'refuse' && options.bandEdgeAction !== 'flag') {
    throw new ConfigInvalid(`--band-edge-action must be refuse or flag, not "${options.bandEdgeAction}"`, {
      configPath: '--band-edge-action',
    });
  }
  // The excitation line closest to the bands bounds the default window; a second, different one is the user's to check.
  const referenceLine = referenceExcitationNm ?? excitationNm;
  if (options.windowNm === undefined && Math.abs(referenceLine - excitationNm) > 1) {
    warnings.push(
      `sample and reference were excited at different wavelengths (${formatSignificant(excitationNm)} and ${formatSignificant(referenceLine)} nm): the default window keeps ${formatSignificant(options.scatterExclusionNm)} nm from the lower one only; give --window-nm when a scatter line lies inside the bands`,
    );
  }
  const windowNm =
    options.windowNm ??
    defaultIntegrationWindow([sample, reference], Math.min(excitationNm, referenceLine), options.scatterExclusionNm);
  const result = quantumYieldFromSpectra({
    sampleEmission: sample,
    referenceEmission: reference,
    windowNm,
    sampleAbsorbance: absorbanceAt(sampleAbsorbanceSpectrum, excitationNm, options.sampleAbsorbance),
    referenceAbsorbance: absorbanceAt(referenceAbsorbanceSpectrum, referenceLine, options.referenceAbsorbance),
    sampleRefractiveIndex: sampleIndex.value,
    referenceRefractiveIndex: referenceIndex.value,
    referenceYield,
    ...(referenceYieldUncertainty === undefined ? {} : { referenceYieldUncertainty }),
    ...(options.detectorUncertainty === undefined
      ? {}
      : {
          detectorCorrectionRelative: {
            value: options.detectorUncertainty,
            basis: 'stated by the user (--detector-uncertainty)',
          },
        }),
    bandEdgeFraction: options.bandEdgeFraction,
    bandEdgeAction: options.bandEdgeAction,
    settingNames: { fraction: '--band-edge-fraction', window: '--window-nm' },
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
        windowNm,
        sampleIntegral: result.sampleIntegral,
        referenceIntegral: result.referenceIntegral,
        flags: result.flags,
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
    `quantum yield ${formatSignificant(result.quantumYield)} ± ${formatSignificant(result.standardUncertainty, 2)} (standard uncertainty; dominant: ${result.dominantContribution})`,
    `integration window ${formatSignificant(windowNm[0])}–${formatSignificant(windowNm[1])} nm${result.flags.length > 0 ? `; flags: ${result.flags.join(', ')}` : ''}`,
    'budget (quantity, value, u, |c·u|, share of variance, basis):',
    ...result.budget.map(
      (l) =>
        `  ${l.quantity.padEnd(26)} ${formatSignificant(l.value, 6).padStart(12)} ${formatSignificant(l.standardUncertainty, 3).padStart(10)} ${formatSignificant(l.contribution, 3).padStart(10)} ${formatSignificant(100 * l.varianceShare, 3).padStart(5)} %  (${l.basis})`,
    ),
    ...allWarnings.map((w) => `warning: ${w}`),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}

export const yieldCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('yield')
      .description(
        'Relative fluorescence quantum yield Φ = Φr·(F/Fr)·(fr/f)·(n²/nr²), f = 1 − 10^(−A) (Brouwer 2011), with an uncertainty budget whose lines say how each u was obtained. Spectra must already be corrected (blank, detector), not for the inner filter.',
      )
      .requiredOption('--sample <file>', 'corrected emission spectrum of the sample')
      .requiredOption('--sample-absorbance <file>', 'absorbance spectrum of the sample')
      .requiredOption('--reference <file>', 'corrected emission spectrum of the reference')
      .requiredOption('--reference-absorbance <file>', 'absorbance spectrum of the reference')
      .option('--standard <id>', 'reference standard id (e.g. quinine-h2so4-0.5m, fluorescein-naoh-0.1m)')
      .option('--reference-yield <phi>', 'reference quantum yield, when not a tabulated standard', finiteNumber)
      .option('--reference-yield-uncertainty <u>', 'standard uncertainty of the reference yield', finiteNumber)
      .option(
        '--sample-index <n>',
        'refractive index of the sample solvent (default: from the solvent in the file)',
        finiteNumber,
      )
      .option(
        '--reference-index <n>',
        'refractive index of the reference solvent (default: standard or file solvent)',
        finiteNumber,
      )
      .option('--excitation-nm <nm>', 'excitation wavelength in nm (default: from the sample file)', finiteNumber)
      .option(
        '--detector-uncertainty <relative>',
        'relative standard uncertainty of the detector-correction ratio',
        finiteNumber,
      )
      .option(
        '--window-nm <from,to>',
        'integration window in nm for both spectra (default: their common range, kept --scatter-exclusion-nm from the excitation line and twice it)',
        windowOption,
      )
      .option(
        '--scatter-exclusion-nm <nm>',
        'distance kept from the excitation line and its second order by the default window',
        finiteNumber,
        15,
      )
      .option(
        '--band-edge-fraction <fraction>',
        'a band above this fraction of its peak at a window edge is not back to baseline',
        finiteNumber,
        0.1,
      )
      .option('--band-edge-action <action>', 'refuse or flag a band not back to baseline', 'refuse')
      .option('--json', 'print the result as JSON')
      .action((options: YieldCliOptions) => {
        runYield(options);
      });
  },
};
