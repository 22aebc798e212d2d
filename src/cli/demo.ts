// `driftlight demo [--workspace DIR]`: copies the bundled example day (examples/day: invented
// exports in several layouts, one malformed) into a fresh workspace (default ./workspace), runs
// `process` over it with the embedded default engine, and prints where everything went and the key
// numbers next to the generator's truth.
import type { Command } from 'commander';
import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AnalysisResult } from '../analysis/result.js';
import type { DemoTruth } from '../demo/scenario.js';
import { ConfigInvalid } from '../model/errors.js';
import type { CommandModule } from './command-module.js';
import { EXIT_CODES } from './exit-codes.js';
import { runBatch } from './process.js';

const EXAMPLE_DAY = fileURLToPath(new URL('../../../examples/day/', import.meta.url));
const MARKER = '.driftlight-demo';

function fmt(value: number | undefined, digits: number): string {
  return value === undefined ? '—' : value.toPrecision(digits);
}

/** Prepares `dir` as a fresh demo workspace (refusing a non-empty folder that is not one). */
export function prepareWorkspace(dir: string): void {
  if (existsSync(dir) && readdirSync(dir).length > 0) {
    if (!existsSync(join(dir, MARKER))) {
      throw new ConfigInvalid(`the workspace ${dir} exists and is not a driftlight demo workspace`, { hint: 'Pass an empty or new folder with --workspace.' });
    }
    rmSync(dir, { recursive: true, force: true });
  }
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, MARKER), 'created by `driftlight demo`; safe to delete\n');
  cpSync(join(EXAMPLE_DAY, 'driftlight.yaml'), join(dir, 'driftlight.yaml'));
  cpSync(join(EXAMPLE_DAY, 'inbox'), join(dir, 'inbox'), { recursive: true });
}

/** The key-numbers table of the demo results against the truth. */
export function demoTable(results: readonly AnalysisResult[], truth: readonly DemoTruth[]): string {
  const header = ['sample', 'role', 'tau ns (true)', 'QY (true)', 'k_r 1/s', 'k_nr 1/s', 'tau0 ns', 'partial'];
  const rows = results.map((r) => {
    const t = truth.find((x) => x.sampleId === r.sampleId);
    return [
      r.sampleId, r.role,
      `${fmt(r.decayFit?.tauMeanIntensityNs, 3)} (${t?.tauNs ?? '—'})`,
      `${fmt(r.quantumYield?.value, 3)} (${t?.quantumYield ?? '—'})`,
      fmt(r.rates?.krPerS, 3), fmt(r.rates?.knrPerS, 3), fmt(r.rates?.tau0Ns, 3), r.partial ? 'yes' : 'no',
    ];
  });
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: readonly string[]): string => cells.map((c, i) => c.padEnd(widths[i] ?? 0)).join('  ');
  return [line(header), ...rows.map(line)].join('\n') + '\n';
}

function readResults(resultsDir: string): AnalysisResult[] {
  const out: AnalysisResult[] = [];
  if (!existsSync(resultsDir)) return out;
  for (const day of readdirSync(resultsDir).sort()) {
    for (const name of readdirSync(join(resultsDir, day)).sort()) {
      if (name.endsWith('.json')) out.push(JSON.parse(readFileSync(join(resultsDir, day, name), 'utf8')) as AnalysisResult);
    }
  }
  return out;
}

export const demoCommand: CommandModule = {
  register(program: Command) {
    program
      .command('demo')
      .description('run the bundled example day through the pipeline in a fresh workspace (default ./workspace)')
      .option('-w, --workspace <dir>', 'workspace folder (created; replaced if it is an earlier demo workspace)', 'workspace')
      .action(async (options: { workspace: string }) => {
        const dir = resolve(options.workspace);
        prepareWorkspace(dir);
        process.stdout.write(`driftlight demo: workspace ${dir}\n`);
        const summary = await runBatch([join(dir, 'inbox')], { config: join(dir, 'driftlight.yaml') });
        const truth = JSON.parse(readFileSync(join(EXAMPLE_DAY, 'truth.json'), 'utf8')) as DemoTruth[];
        process.stdout.write(`\n${demoTable(readResults(join(dir, 'results')), truth)}`);
        process.stdout.write(`\n(${summary.rejected} input rejected on purpose: see quarantine/*/*.error.json)\n`);
        process.exitCode = EXIT_CODES.ok.code;
      });
  },
};
