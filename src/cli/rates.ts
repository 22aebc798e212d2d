// `driftlight rates --yield PHI --tau-ns T`: radiative and non-radiative rate constants and the radiative lifetime.
import type { Command } from 'commander';
import { rateConstantsFromYield, timeScalePlausibility } from '../photophysics/index.js';
import type { CommandModule } from './command-module.js';
import { finiteNumber, toJson } from './correct.js';

interface RatesCliOptions {
  readonly yield: number;
  readonly tauNs: number;
  readonly yieldUncertainty?: number;
  readonly tauUncertaintyNs?: number;
  readonly json?: boolean;
}

function runRates(options: RatesCliOptions): void {
  const rates = rateConstantsFromYield({
    quantumYield: options.yield,
    tauNs: options.tauNs,
    ...(options.yieldUncertainty === undefined ? {} : { quantumYieldUncertainty: options.yieldUncertainty }),
    ...(options.tauUncertaintyNs === undefined ? {} : { tauUncertaintyNs: options.tauUncertaintyNs }),
  });
  const warnings = timeScalePlausibility('fluorescence', options.tauNs);
  if (options.json === true) {
    process.stdout.write(`${toJson({ quantumYield: options.yield, tauNs: options.tauNs, ...rates, warnings })}\n`);
    return;
  }
  const lines = [
    `k_r  = ${rates.krPerS.toExponential(4)} s^-1`,
    `k_nr = ${rates.knrPerS.toExponential(4)} s^-1`,
    `tau0 = ${rates.tau0Ns.toPrecision(5)} ns (radiative lifetime)`,
    `1/tau = ${rates.totalDecayRatePerS.toExponential(4)} s^-1`,
    ...warnings.map((w) => `warning: ${w}`),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}

export const ratesCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('rates')
      .description(
        'Rate constants from a fluorescence quantum yield and lifetime: k_r = Φ/τ, k_nr = (1 − Φ)/τ, τ0 = τ/Φ (Birks 1976).',
      )
      .requiredOption('--yield <phi>', 'fluorescence quantum yield (0 < Φ ≤ 1)', finiteNumber)
      .requiredOption('--tau-ns <ns>', 'fluorescence lifetime in ns', finiteNumber)
      .option('--yield-uncertainty <u>', 'standard uncertainty of Φ', finiteNumber)
      .option('--tau-uncertainty-ns <ns>', 'standard uncertainty of τ in ns', finiteNumber)
      .option('--json', 'print the result as JSON')
      .action((options: RatesCliOptions) => {
        runRates(options);
      });
  },
};
