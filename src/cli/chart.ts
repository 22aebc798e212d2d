// `driftlight chart CONTROL [--metric M] [--days N] [--out F.svg|F.html]`: the control's chart from
// the ledger's QC history — as text on the terminal, or rendered to SVG or a self-contained HTML page.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { ConfigInvalid } from '../model/errors.js';
import { writeFileAtomic } from '../output/atomic-write.js';
import { controlChartFigure } from '../output/chart-figure.js';
import { figureHtml, standalonePage } from '../output/chart-html.js';
import { controlChartsFromLedger, selectControls } from '../output/chart-source.js';
import { controlChartText } from '../output/chart-text.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import { METRIC_NAMES, type MetricName } from '../qc/index.js';
import { LEDGER_FILE_NAME, openLedger } from '../store/ledger.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

interface ChartOptions {
  readonly config?: string;
  readonly metric?: MetricName;
  readonly days?: number;
  readonly out?: string;
}

function parseMetric(text: string): MetricName {
  if (!(METRIC_NAMES as readonly string[]).includes(text))
    throw new InvalidArgumentError(`expected one of ${METRIC_NAMES.join(', ')}`);
  return text as MetricName;
}

function parseDays(text: string): number {
  const days = Number(text);
  if (!Number.isInteger(days) || days < 1) throw new InvalidArgumentError('expected a whole number of days ≥ 1');
  return days;
}

/** Runs the command; returns what was written (text, or the path of the file). */
export async function runChart(controlId: string, options: ChartOptions, now: Date = new Date()): Promise<string> {
  const config = configFromOptions(options);
  const ruleSet = effectiveRuleSet(config);
  try {
    selectControls(ruleSet, controlId);
  } catch (error) {
    throw new ConfigInvalid(error instanceof Error ? error.message : String(error), {
      configPath: 'controls',
      hint: 'Name a control defined under controls: in the config or in the rule set.',
    });
  }
  if (!existsSync(join(config.folders.state, LEDGER_FILE_NAME)))
    return `no ledger yet in ${config.folders.state} (nothing processed)\n`;
  const ledger = openLedger(config.folders.state);
  try {
    const sinceEpochMs = options.days === undefined ? undefined : now.getTime() - options.days * 86_400_000;
    const charts = controlChartsFromLedger(ledger, ruleSet, {
      controlId,
      ...(options.metric === undefined ? {} : { metric: options.metric }),
      ...(sinceEpochMs === undefined ? {} : { sinceEpochMs }),
    });
    if (charts.length === 0) return `control ${controlId}: no runs recorded yet\n`;
    if (options.out === undefined) return charts.map(controlChartText).join('\n');
    const figures = await Promise.all(charts.map(controlChartFigure));
    if (options.out.toLowerCase().endsWith('.svg')) {
      if (figures.length > 1)
        throw new ConfigInvalid(`control ${controlId} has ${figures.length} metrics; an SVG file holds one chart`, {
          hint: 'Add --metric NAME, or write --out FILE.html for all of them.',
        });
      writeFileAtomic(options.out, `${figures[0]?.svg ?? ''}\n`, { durable: false });
    } else if (options.out.toLowerCase().endsWith('.html')) {
      const title = `Control charts: ${controlId}`;
      writeFileAtomic(options.out, standalonePage(title, `<h1>${title}</h1>\n${figures.map(figureHtml).join('\n')}`), {
        durable: false,
      });
    } else {
      throw new ConfigInvalid(`--out ${options.out}: expected a file name ending in .svg or .html`, {
        hint: 'Write --out chart.svg or --out chart.html.',
      });
    }
    return `wrote ${options.out} (${figures.length} chart${figures.length === 1 ? '' : 's'})\n`;
  } finally {
    ledger.close();
  }
}

export const chartCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(
      program
        .command('chart')
        .argument('<control>', 'control id (from controls: in the config or the rule set)')
        .description(
          'control chart of a control: values with baseline mean ±1/2/3 SD, EWMA and CUSUM, flags, exclusions, rebaselines',
        ),
    )
      .option(
        '--metric <name>',
        `one metric (${METRIC_NAMES.join(', ')}); default every metric the control has`,
        parseMetric,
      )
      .option('--days <n>', 'only the last N days (statistics still use the whole history)', parseDays)
      .option('--out <file>', 'write an SVG (one metric) or a self-contained HTML page instead of text')
      .action(async (control: string, options: ChartOptions) => {
        process.stdout.write(await runChart(control, options));
      });
  },
};
