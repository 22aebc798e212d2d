// What the demo leaves for a person to open after the replay: the digest of the last day (HTML with
// charts, Markdown, JSON), the daily control's chart as a self-contained HTML page, and the summary
// table of the month as CSV — each built by the same code as `digest`, `chart` and `export`.
import { join } from 'node:path';
import { loadConfig } from '../config/index.js';
import { buildDigest } from '../output/digest-build.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import { openLedger } from '../store/ledger.js';
import { runChart } from './chart.js';
import { runExport } from './export.js';
import { softwareVersion } from './version.js';

export interface DemoOutputs {
  readonly digestHtml: string;
  /** Every digest file written (HTML, Markdown, CSV, JSON). */
  readonly digestFiles: readonly string[];
  readonly digestCharts: number;
  readonly chartHtml: string;
  readonly summaryCsv: string;
}

/** Writes the digest of `lastDate`, the control chart and the month's summary CSV into the workspace's results/ (clock `now`: the replay's end). */
export async function writeDemoOutputs(
  workspace: string,
  options: { firstDate: string; lastDate: string; now: Date },
): Promise<DemoOutputs> {
  const configPath = join(workspace, 'driftlight.yaml');
  const config = loadConfig(configPath);
  const ruleSet = effectiveRuleSet(config);
  const ledger = openLedger(config.folders.state);
  let digest;
  try {
    digest = await buildDigest(ledger, config, ruleSet, {
      date: options.lastDate,
      now: options.now,
      softwareVersion: softwareVersion(),
    });
  } finally {
    ledger.close();
  }
  const control = ruleSet.controls[0]?.id;
  if (control === undefined) throw new Error('demo: the month config defines no control');
  const chartHtml = join(config.folders.results, 'charts', `${control}.html`);
  await runChart(control, { config: configPath, out: chartHtml }, options.now);
  const summaryCsv = join(config.folders.results, 'export', `summary-${options.firstDate}-to-${options.lastDate}.csv`);
  runExport({
    config: configPath,
    since: Date.parse(`${options.firstDate}T00:00:00Z`),
    format: 'csv',
    out: summaryCsv,
  });
  const digestHtml = digest.paths.find((path) => path.endsWith('.html'));
  if (digestHtml === undefined) throw new Error('demo: the digest wrote no HTML');
  return { digestHtml, digestFiles: digest.paths, digestCharts: digest.figures, chartHtml, summaryCsv };
}
