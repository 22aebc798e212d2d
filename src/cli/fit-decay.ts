// `driftlight fit-decay DECAY [--irf IRF] ...`: reads a decay histogram (and optionally an IRF file),
// fits lifetimes with the decay engine and prints a text report with an ASCII residual plot, or JSON.
import { readFile } from 'node:fs/promises';
import { InvalidArgumentError, type Command } from 'commander';
import { alignIrfToDecay } from '../decay/irf-axis.js';
import {
  fitDecay,
  PARAMETER_NAMES,
  type DecayFitResult,
  type FitDecayOptions,
  type ParameterName,
} from '../decay/index.js';
import { readData } from '../formats/index.js';
import type { Decay } from '../model/decay.js';
import { InputRejected } from '../model/errors.js';
import type { CommandModule } from './command-module.js';
import { EXIT_CODES, exitCodesHelp } from './exit-codes.js';
import { reportError } from './report-error.js';
import { itemAt } from '../model/item-at.js';

interface FitDecayFlags {
  readonly irf?: string;
  readonly components: FitDecayOptions['components'];
  readonly estimator: FitDecayOptions['estimator'];
  readonly range?: readonly [number, number];
  readonly fix: Readonly<Partial<Record<ParameterName, number>>>;
  readonly scatter?: boolean;
  readonly repetitionRateMhz?: number;
  readonly pileUpCorrection?: boolean;
  readonly json?: boolean;
}

function parseComponents(text: string): FitDecayOptions['components'] {
  if (text === 'auto') return 'auto';
  if (text === '1' || text === '2' || text === '3' || text === '4') return Number(text) as 1 | 2 | 3 | 4;
  throw new InvalidArgumentError('expected 1, 2, 3, 4 or auto');
}

function parseEstimator(text: string): FitDecayOptions['estimator'] {
  if (text === 'ml' || text === 'lsq-neyman' || text === 'lsq-pearson') return text;
  throw new InvalidArgumentError('expected ml, lsq-neyman or lsq-pearson');
}

function parsePositive(text: string): number {
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value) || value <= 0)
    throw new InvalidArgumentError('expected a positive number, e.g. 80');
  return value;
}

function parseRange(text: string): readonly [number, number] {
  const parts = text.split(':').map(Number);
  const [start, end] = parts;
  if (
    parts.length !== 2 ||
    start === undefined ||
    end === undefined ||
    !Number.isFinite(start) ||
    !Number.isFinite(end) ||
    end <= start
  ) {
    throw new InvalidArgumentError('expected START_NS:END_NS with END_NS > START_NS, e.g. 1.5:40');
  }
  return [start, end];
}

/** Accepts `tau1=3.9` (ns) as well as the full parameter names (`tau1Ns=3.9`, `shiftNs=0`, `backgroundPerChannel=2`). */
function parseFix(
  text: string,
  previous: Readonly<Partial<Record<ParameterName, number>>>,
): Partial<Record<ParameterName, number>> {
  const match = /^([A-Za-z0-9]+)=(.+)$/.exec(text);
  const value = match === null ? Number.NaN : Number(match[2]);
  const raw = match?.[1] ?? '';
  const name = /^tau[1-4]$/.test(raw)
    ? `${raw}Ns`
    : raw === 'shift'
      ? 'shiftNs'
      : raw === 'background'
        ? 'backgroundPerChannel'
        : raw;
  const known = PARAMETER_NAMES.find((candidate) => candidate === name);
  if (known === undefined || !Number.isFinite(value)) {
    throw new InvalidArgumentError(
      `expected NAME=VALUE with NAME one of tau1…tau4 (ns), photons1…4, shift (ns), background, e.g. tau1=3.9`,
    );
  }
  return { ...previous, [known]: value };
}

async function readDecay(path: string, role: string): Promise<Decay> {
  const content = new Uint8Array(await readFile(path));
  const parsed = readData(content, { fileName: path, kindHint: 'decay' });
  if (parsed.type !== 'decay') {
    throw new InputRejected('INPUT_INVALID', `the ${role} file holds a spectrum, not a decay histogram`, {
      file: path,
    });
  }
  return parsed.decay;
}

/** ASCII plot of the weighted residuals: `width` columns (bin means), rows from +4 to −4. */
export function residualPlot(residuals: readonly number[], width = 72, height = 9): string {
  const limit = 4;
  const grid: string[][] = Array.from({ length: height }, () => new Array<string>(width).fill(' '));
  const zeroRow = Math.floor(height / 2);
  for (let column = 0; column < width; column++) itemAt(grid, zeroRow)[column] = '-';
  const bins = Math.min(width, residuals.length);
  for (let column = 0; column < bins; column++) {
    const from = Math.floor((column * residuals.length) / bins);
    const to = Math.max(from + 1, Math.floor(((column + 1) * residuals.length) / bins));
    let sum = 0;
    for (let k = from; k < to; k++) sum += residuals[k] ?? 0;
    const mean = (sum / (to - from)) * Math.sqrt(to - from);
    const clamped = Math.max(-limit, Math.min(limit, mean));
    const row = Math.round(((limit - clamped) / (2 * limit)) * (height - 1));
    itemAt(grid, row)[column] = Math.abs(mean) > limit ? '!' : '*';
  }
  const labels = Array.from({ length: height }, (_unused, row) =>
    (limit - (2 * limit * row) / (height - 1)).toFixed(0).padStart(3),
  );
  return grid.map((row, index) => `${labels[index] ?? ''} |${row.join('')}`).join('\n');
}

function formatNumber(value: number | undefined, digits = 4): string {
  return value === undefined ? 'n/a' : value.toPrecision(digits);
}

/** The plain-text report of a fit. */
export function formatFitReport(file: string, fit: DecayFitResult): string {
  const lines = [
    `${file}: ${fit.model} fit, ${fit.components.length} component(s), estimator ${fit.estimator}`,
    `  status      ${fit.converged ? 'converged' : 'NOT CONVERGED'} after ${fit.iterations} iterations (${fit.reason}); ${fit.starts} start(s)`,
    `  acceptable  ${fit.acceptable ? 'yes' : `NO: ${fit.unacceptableReasons.join('; ')}`}`,
    `  range       ${fit.rangeNs[0].toFixed(3)} … ${fit.rangeNs[1].toFixed(3)} ns (channels ${fit.rangeChannels[0] + 1}–${fit.rangeChannels[1]}), ${fit.photonsInRange} of ${fit.photons} counts`,
    '  component   tau (ns)     std err    68% profile interval     amplitude    a-fraction  i-fraction',
    ...fit.components.map((component, index) => {
      const interval = component.tauNsInterval;
      const profile =
        interval === undefined ? 'n/a' : `${formatNumber(interval.lowNs)} … ${formatNumber(interval.highNs)}`;
      return `  ${String(index + 1).padEnd(11)} ${formatNumber(component.tauNs, 5).padEnd(12)} ${formatNumber(component.tauNsStdErr, 3).padEnd(10)} ${profile.padEnd(24)} ${component.amplitude.toPrecision(5).padEnd(12)} ${component.amplitudeFraction.toFixed(4).padEnd(11)} ${component.intensityFraction.toFixed(4)}${component.tauFixed ? '  (fixed)' : ''}`;
    }),
    ...fit.components.flatMap((component, index) => {
      const interval = component.tauNsInterval;
      return [
        ...(interval?.lowReason === undefined
          ? []
          : [`  interval    tau${index + 1} low end missing: ${interval.lowReason}`]),
        ...(interval?.highReason === undefined
          ? []
          : [`  interval    tau${index + 1} high end missing: ${interval.highReason}`]),
      ];
    }),
    ...fit.errorNotes.map((note) => `  errors      ${note}`),
    `  mean tau    amplitude-weighted ${fit.tauMeanAmplitudeNs.toPrecision(5)} ns, intensity-weighted ${fit.tauMeanIntensityNs.toPrecision(5)} ns`,
    `  shift       ${fit.shiftNs.toPrecision(4)} ns; background ${fit.backgroundPerChannel.toPrecision(4)} counts/channel; scatter fraction ${fit.scatterFraction.toPrecision(3)}`,
    `  goodness    chi2_red ${fit.chi2Reduced.toFixed(4)}; deviance ${fit.deviance.toFixed(2)} (${fit.degreesOfFreedom} dof); Durbin-Watson ${fit.durbinWatson.toFixed(3)}; runs z ${fit.runsTest.z.toFixed(2)}; AIC ${fit.aic.toFixed(2)}; BIC ${fit.bic.toFixed(2)}`,
    ...(fit.selection === undefined ? [] : [`  selection   ${fit.selection.reason}`]),
    '  weighted residuals:',
    residualPlot(fit.weightedResiduals),
    ...fit.warnings.map((warning) => `warning: ${warning}`),
  ];
  return `${lines.join('\n')}\n`;
}

async function runFitDecay(path: string, flags: FitDecayFlags): Promise<void> {
  const decay = await readDecay(path, 'decay');
  let irfCounts: ArrayLike<number> | undefined;
  let irfNote: string | undefined;
  if (flags.irf !== undefined) {
    const irf = await readDecay(flags.irf, 'IRF');
    try {
      const aligned = alignIrfToDecay(
        { timeNs: irf.timeNs, counts: irf.irfCounts ?? irf.counts, channelWidthNs: irf.channelWidthNs },
        decay,
      );
      irfCounts = aligned.counts;
      irfNote = aligned.note;
    } catch (error) {
      throw error instanceof InputRejected ? error.withLocation(flags.irf) : error;
    }
  }
  const fit = fitDecay(decay, {
    components: flags.components,
    estimator: flags.estimator,
    fixed: flags.fix,
    scatter: flags.scatter === true,
    pileUpCorrection: flags.pileUpCorrection === true,
    repetitionRateHz: flags.repetitionRateMhz === undefined ? undefined : flags.repetitionRateMhz * 1e6,
    rangeNs: flags.range,
    irfCounts,
  });
  const reported = irfNote === undefined ? fit : { ...fit, warnings: [irfNote, ...fit.warnings] };
  process.stdout.write(
    flags.json === true ? `${JSON.stringify({ file: path, ...reported }, null, 2)}\n` : formatFitReport(path, reported),
  );
}

export const fitDecayCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('fit-decay')
      .argument(
        '<decay>',
        'decay histogram file (CSV/TSV/text, JCAMP-DX or driftlight JSON); an "irf" column is used as the IRF',
      )
      .description(
        'Fit fluorescence lifetimes: reconvolution with the IRF (or a tail fit without one), Poisson ML or weighted LS.',
      )
      .option(
        '--irf <file>',
        "IRF file (its irf or counts column), placed on the decay's channels by its own time axis (resampled when finer, refused when coarser)",
      )
      .option('--components <n>', 'number of exponentials 1-4, or auto (BIC)', parseComponents, 1)
      .option('--estimator <name>', 'ml, lsq-neyman or lsq-pearson', parseEstimator, 'ml')
      .option('--range <start:end>', 'fit range in ns, e.g. 1.5:40 (default: from the IRF rise to the end)', parseRange)
      .option('--fix <name=value>', 'hold a parameter, e.g. tau1=3.9 (ns); repeatable', parseFix, {})
      .option('--scatter', 'fit a scatter term (a fraction of the IRF added to the model; needs an IRF)')
      .option(
        '--repetition-rate-mhz <MHz>',
        'excitation repetition rate in MHz (overrides the file); earlier pulses are modelled when the period spans the histogram',
        parsePositive,
      )
      .option(
        '--pile-up-correction',
        'apply the Coates pile-up correction (needs the collection time and the repetition rate)',
      )
      .option('--json', 'print the full result as JSON')
      .addHelpText('after', `\n${exitCodesHelp()}`)
      .action(async (path: string, flags: FitDecayFlags) => {
        try {
          await runFitDecay(path, flags);
        } catch (error) {
          if (error instanceof Error && 'syscall' in error) {
            process.stderr.write(
              `${path}: cannot open: ${error.message}\n  hint: check the path and the file permissions.\n`,
            );
            process.exitCode = EXIT_CODES.usage.code;
            return;
          }
          process.exitCode = reportError(error);
        }
      });
  },
};
