// `driftlight rules check FILE` (validate and print a rule set), `driftlight rules simulate`
// (replay stored results in acquisition order and list the alerts that would have fired) and
// `driftlight rules rebaseline CONTROL --from DATE` (start a new baseline in the ledger).
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { userInfo } from 'node:os';
import { join } from 'node:path';
import type { Command } from 'commander';
import type { AnalysisResult } from '../analysis/result.js';
import { RESULT_SCHEMA } from '../analysis/result.js';
import { ConfigInvalid } from '../model/errors.js';
import { effectiveRuleSet, loadRuleSetFile } from '../pipeline/qc-rule-set.js';
import {
  establishBaseline,
  localParts,
  metricLabel,
  observationFromResult,
  parseClockTime,
  parseIsoToEpochMs,
  replayObservations,
  ruleKindOf,
  ruleNeedsBaseline,
  sortByAcquisition,
  zonedTimeToEpochMs,
  describeScope,
  rulesJudgingControl,
  ruleSetWarnings,
  scopeJudgesControl,
  type BaselineRecord,
  type ControlObservation,
  type MetricName,
  type QcFlag,
  type RuleSet,
} from '../qc/index.js';
import { openLedger } from '../store/ledger.js';
import { acknowledgeFlags, excludedSetIds, qcActions, recordAction, type QcAction } from '../store/qc-actions-store.js';
import { baselineRecords, observationHistory, saveBaseline } from '../store/qc-store.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

/** The controls of a rule set, each with its match, targets and the ids of the rules that judge it. */
export function formatControls(ruleSet: RuleSet): string[] {
  const lines: string[] = [];
  if (ruleSet.controls.length === 0) lines.push('  (none defined: add a `controls` entry to driftlight.yaml)');
  for (const control of ruleSet.controls) {
    const { measurement, ...selectors } = control.match;
    const match = Object.entries(selectors)
      .map(([key, value]) => `${key} ${String(value)}`)
      .join(', ');
    const targets = Object.entries(control.targets).map(
      ([metric, target]) => `${metric} ${target.mean} ± ${target.sd}`,
    );
    const judging = rulesJudgingControl(ruleSet, control.id).map((rule) => rule.id);
    lines.push(`  ${control.id}  match: ${match}`);
    lines.push(
      `    ${targets.length === 0 ? '' : `targets: ${targets.join('; ')}; `}other metrics: baseline from the first ${control.baselineRuns} runs`,
    );
    lines.push(`    judged by: ${judging.length === 0 ? '(no rule)' : judging.join(', ')}`);
    lines.push(
      `    measurement judged: ${measurement === undefined ? 'the first of a file holding several (set `measurement` to name a column)' : `"${measurement}"`}; a file's other measurements are not judged`,
    );
  }
  return lines;
}

/** The rule set as text: header, controls (with the rules judging each), rules, warnings. */
export function formatRuleSet(ruleSet: RuleSet, source: string): string {
  const lines = [
    `${source}: valid rule set${ruleSet.name === undefined ? '' : ` "${ruleSet.name}"`} (time zone ${ruleSet.timeZone})`,
    '',
    'controls:',
  ];
  lines.push(...formatControls(ruleSet));
  lines.push('', 'rules:');
  for (const rule of ruleSet.rules) {
    lines.push(
      `  ${rule.id.padEnd(20)} ${rule.severity.padEnd(8)} ${rule.metric} @ ${describeScope(rule.scope)}: ${ruleKindOf(rule).describe(rule)}`,
    );
  }
  const warnings = ruleSetWarnings(ruleSet);
  if (warnings.length > 0) lines.push('', ...warnings.map((warning) => `warning: ${warning}`));
  return `${lines.join('\n')}\n`;
}

/** Every *.json file under `dir` (recursively), sorted by path. */
function jsonFilesUnder(dir: string): string[] {
  const found: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) found.push(...jsonFilesUnder(path));
    else if (entry.isFile() && entry.name.endsWith('.json')) found.push(path);
  }
  return found.sort();
}

/** Observations of the stored results under `resultsDir` (unreadable or foreign JSON skipped with a note on stderr). */
export function observationsFromResultsDir(resultsDir: string, ruleSet: RuleSet): ControlObservation[] {
  if (!statSync(resultsDir, { throwIfNoEntry: false })?.isDirectory()) {
    throw new ConfigInvalid(`results folder not found: ${resultsDir}`, {
      hint: 'Pass the folder the pipeline writes results/YYYY-MM-DD/*.json into.',
    });
  }
  const observations: ControlObservation[] = [];
  for (const file of jsonFilesUnder(resultsDir)) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(readFileSync(file, 'utf8'));
    } catch {
      process.stderr.write(`${file}: skipped (not valid JSON)\n`);
      continue;
    }
    if (typeof parsed !== 'object' || parsed === null || (parsed as { schema?: unknown }).schema !== RESULT_SCHEMA)
      continue;
    const observation = observationFromResult(parsed as AnalysisResult, ruleSet.controls);
    if (observation === undefined) continue;
    if (parseIsoToEpochMs(observation.acquiredAt) === undefined) {
      process.stderr.write(`${file}: skipped (acquiredAt "${observation.acquiredAt}" is not an ISO date-time)\n`);
      continue;
    }
    observations.push(observation);
  }
  return sortByAcquisition(observations);
}

/** Clock instants for time rules: each local day of the history, one minute after each rule's due time. */
function clockTicks(observations: readonly ControlObservation[], ruleSet: RuleSet): number[] {
  const first = observations[0];
  const last = observations[observations.length - 1];
  if (first === undefined || last === undefined) return [];
  const ticks = new Set<number>();
  for (const rule of ruleSet.rules) {
    if (rule.kind !== 'control-missing') continue;
    const zone = rule.timeZone ?? ruleSet.timeZone;
    const dueMinute = (parseClockTime(rule.dueBy) ?? 0) + 1;
    const startMs = parseIsoToEpochMs(first.acquiredAt) ?? 0;
    const endMs = parseIsoToEpochMs(last.acquiredAt) ?? 0;
    for (let dayMs = startMs; dayMs <= endMs + 86_400_000; dayMs += 86_400_000) {
      const tick = zonedTimeToEpochMs(localParts(dayMs, zone).date, dueMinute, zone);
      if (tick >= startMs && tick <= endMs + 86_400_000) ticks.add(tick);
    }
  }
  return [...ticks].sort((a, b) => a - b);
}

interface SimulatedAlert {
  readonly at: string;
  readonly type: 'flag' | 'recovery';
  readonly severity: string;
  readonly ruleId: string;
  readonly check: string;
  readonly controlId: string;
  readonly metric: string;
  readonly setId: string;
  readonly message: string;
}

/** Replays observations and lists flags and recoveries in time order. */
export function simulateAlerts(
  observations: readonly ControlObservation[],
  ruleSet: RuleSet,
  baselines: readonly BaselineRecord[] = [],
): SimulatedAlert[] {
  const outcome = replayObservations(observations, ruleSet, {
    baselines,
    clockTicksEpochMs: clockTicks(observations, ruleSet),
  });
  const fromFlag = (flag: QcFlag): SimulatedAlert => ({
    at: flag.acquiredAt,
    type: 'flag',
    severity: flag.severity,
    ruleId: flag.ruleId,
    check: flag.check,
    controlId: flag.controlId,
    metric: flag.metric,
    setId: flag.setId,
    message: flag.message,
  });
  const alerts: SimulatedAlert[] = [];
  for (const step of outcome.steps) {
    alerts.push(...step.flags.map(fromFlag));
    alerts.push(
      ...step.recoveries.map((notice) => ({
        at: notice.acquiredAt,
        type: 'recovery' as const,
        severity: 'info',
        ruleId: notice.ruleId,
        check: '',
        controlId: notice.controlId,
        metric: notice.metric,
        setId: step.observation.setId,
        message: notice.message,
      })),
    );
  }
  const seenClock = new Set<string>();
  for (const flag of outcome.clockFlags) {
    if (seenClock.has(flag.message)) continue;
    seenClock.add(flag.message);
    alerts.push(fromFlag(flag));
  }
  return alerts.sort((a, b) => (parseIsoToEpochMs(a.at) ?? 0) - (parseIsoToEpochMs(b.at) ?? 0));
}

/**
 * Text lines of simulated alerts, with repeated control-missing lines of a control summarised in one
 * line (first and last day, count) placed at the first one.
 */
export function formatAlertLines(alerts: readonly SimulatedAlert[]): string[] {
  const missingByControl = new Map<string, SimulatedAlert[]>();
  for (const alert of alerts) {
    if (alert.check !== 'control missing') continue;
    missingByControl.set(alert.controlId, [...(missingByControl.get(alert.controlId) ?? []), alert]);
  }
  const lines: string[] = [];
  for (const alert of alerts) {
    const group = alert.check === 'control missing' ? (missingByControl.get(alert.controlId) ?? []) : [];
    if (group.length < 2) {
      lines.push(formatAlertLine(alert));
      continue;
    }
    if (group[0] !== alert) continue;
    const last = group[group.length - 1] ?? alert;
    lines.push(
      `${alert.at}  ${alert.severity.toUpperCase().padEnd(9)} ${alert.ruleId} control missing  ${alert.controlId}  ` +
        `no control result by the due time on ${group.length} days, ${alert.at.slice(0, 10)} to ${last.at.slice(0, 10)} (one line per day with --json).`,
    );
  }
  return lines;
}

/** One line per recorded action: when, what, who, why. */
export function formatActionLine(action: QcAction): string {
  const target = [
    action.setId === undefined ? undefined : `run ${action.setId}`,
    action.flagKey === undefined ? undefined : `flag ${action.flagKey}`,
  ]
    .filter((part) => part !== undefined)
    .join(', ');
  return `${action.atIso}  ${action.action.toUpperCase().padEnd(11)} ${action.controlId}${target === '' ? '' : `  ${target}`}  by ${action.by}: ${action.comment}`;
}

/** Who did it: --by, else the OS user. */
function actor(by: string | undefined): string {
  if (by !== undefined && by.trim() !== '') return by.trim();
  try {
    return userInfo().username;
  } catch {
    throw new ConfigInvalid('cannot tell who is acting: the OS user is unknown', { hint: 'Pass --by NAME.' });
  }
}

/** One text line per simulated alert. */
function formatAlertLine(alert: SimulatedAlert): string {
  const tag = alert.type === 'recovery' ? 'RECOVERED' : alert.severity.toUpperCase();
  return `${alert.at}  ${tag.padEnd(9)} ${alert.ruleId}${alert.check === '' ? '' : ` ${alert.check}`}  ${alert.controlId}  ${alert.message}`;
}

/** The metrics a control's baseline concerns: those its chart rules watch. */
function chartMetrics(ruleSet: RuleSet, controlId: string): MetricName[] {
  const metrics = new Set<MetricName>();
  for (const rule of ruleSet.rules) {
    if (scopeJudgesControl(rule.scope, controlId) && ruleNeedsBaseline(rule)) metrics.add(rule.metric);
  }
  return [...metrics];
}

export const rulesCommand: CommandModule = {
  register(program: Command) {
    const rules = program.command('rules').description('QC rule sets: validate, replay history, rebaseline a control');

    withConfigOption(
      rules
        .command('check')
        .description(
          'validate a rule set file and print its controls and rules; with --config, the merged view (config controls + rules) (exit 2 naming the config path when invalid)',
        )
        .argument('[file]', "rule set YAML (default: the config's rules.file, else the built-in rule set)")
        .option('--json', 'print the validated rule set as JSON'),
    ).action((file: string | undefined, options: { json?: boolean; config?: string }) => {
      const config = options.config === undefined ? undefined : configFromOptions(options);
      const ruleSet = config === undefined ? loadRuleSetFile(file) : effectiveRuleSet(config, file);
      const source = `${file ?? config?.rules.file ?? 'built-in rules/default.yaml'}${config === undefined ? '' : ` + controls of ${config.configFile ?? 'the config'}`}`;
      process.stdout.write(
        options.json === true ? `${JSON.stringify(ruleSet, null, 2)}\n` : formatRuleSet(ruleSet, source),
      );
    });

    withConfigOption(
      rules
        .command('simulate')
        .description(
          'replay stored results (RESULTS_DIR/YYYY-MM-DD/*.json) in acquisition order and list the alerts that would have fired, and when',
        )
        .requiredOption('--history <dir>', 'results folder to replay')
        .option('--rules <file>', "rule set YAML (default: the config's rules.file, else the built-in rule set)")
        .option('--json', 'print JSON lines'),
    ).action((options: { history: string; rules?: string; json?: boolean; config?: string }) => {
      const config = options.config === undefined ? undefined : configFromOptions(options);
      const ruleSet = config === undefined ? loadRuleSetFile(options.rules) : effectiveRuleSet(config, options.rules);
      // Actions recorded in the config's ledger (acknowledgements, exclusions, rebaselines) are shown,
      // and excluded runs are left out of the replay as the pipeline leaves them out (issue 16.7).
      const ledgerFile = config === undefined ? undefined : join(config.folders.state, 'ledger.sqlite');
      let actions: QcAction[] = [];
      let excluded = new Set<string>();
      if (config !== undefined && ledgerFile !== undefined && existsSync(ledgerFile)) {
        const ledger = openLedger(config.folders.state);
        try {
          actions = qcActions(ledger);
          excluded = excludedSetIds(ledger);
        } finally {
          ledger.close();
        }
      }
      const observations = observationsFromResultsDir(options.history, ruleSet).filter(
        (observation) => !excluded.has(observation.setId),
      );
      const alerts = simulateAlerts(observations, ruleSet);
      if (options.json === true) {
        for (const alert of alerts) process.stdout.write(`${JSON.stringify(alert)}\n`);
        for (const action of actions) process.stdout.write(`${JSON.stringify({ type: 'action', ...action })}\n`);
        return;
      }
      process.stdout.write(
        `replayed ${observations.length} QC observation(s)${excluded.size === 0 ? '' : ` (${excluded.size} excluded)`}; ${alerts.filter((a) => a.type === 'flag').length} flag(s), ${alerts.filter((a) => a.type === 'recovery').length} recovery notice(s)\n`,
      );
      for (const line of formatAlertLines(alerts)) process.stdout.write(`${line}\n`);
      if (actions.length > 0)
        process.stdout.write(`actions:\n${actions.map((action) => `  ${formatActionLine(action)}`).join('\n')}\n`);
    });

    withConfigOption(
      rules
        .command('rebaseline')
        .description(
          'start a new baseline for CONTROL from DATE: computed now from the ledger when enough runs exist, else from the next runs',
        )
        .argument('<control>', 'control id')
        .requiredOption(
          '--from <date>',
          'first day of the new baseline (YYYY-MM-DD, UTC midnight, or an ISO date-time)',
        )
        .option('--rules <file>', "rule set YAML (default: the config's rules.file, else the built-in rule set)")
        .requiredOption('--comment <text>', 'why (recorded with who and when)')
        .option('--by <name>', 'who (default: the OS user)'),
    ).action(
      (controlId: string, options: { from: string; rules?: string; config?: string; comment: string; by?: string }) => {
        const config = configFromOptions(options);
        const ruleSet = effectiveRuleSet(config, options.rules);
        const control = ruleSet.controls.find((candidate) => candidate.id === controlId);
        if (control === undefined) {
          throw new ConfigInvalid(
            `no control "${controlId}" in the rule set (known: ${ruleSet.controls.map((c) => c.id).join(', ') || 'none'})`,
            { hint: 'Name a control id from `driftlight rules check`.' },
          );
        }
        const fromMs = parseIsoToEpochMs(options.from);
        if (fromMs === undefined)
          throw new ConfigInvalid(`--from "${options.from}" is not a date (YYYY-MM-DD) or ISO date-time`);
        const fromIso = new Date(fromMs).toISOString();
        const ledger = openLedger(config.folders.state);
        try {
          const excluded = excludedSetIds(ledger);
          const runs = observationHistory(ledger, [controlId]).filter(
            (o) => (parseIsoToEpochMs(o.acquiredAt) ?? -Infinity) >= fromMs && !excluded.has(o.setId),
          );
          const createdAt = new Date().toISOString();
          const by = actor(options.by);
          const outcome: Record<string, unknown> = {};
          for (const metric of chartMetrics(ruleSet, controlId)) {
            const declared = control.targets[metric];
            if (declared !== undefined) {
              // The truth: a declared target wins over any baseline (docs/qc.md), so none is stored for it.
              outcome[metric] = { declared };
              process.stdout.write(
                `${controlId} ${metricLabel(metric)}: not rebaselined — the config declares target ${declared.mean} ± ${declared.sd}, which the charts keep judging against (remove the target to judge against a baseline)\n`,
              );
              continue;
            }
            const points = runs.filter((o) => o.metrics[metric] !== undefined).slice(0, control.baselineRuns);
            const values = points.map((o) => o.metrics[metric] ?? 0);
            const established =
              points.length >= control.baselineRuns
                ? establishBaseline(values, control.baselineExcludeBeyondSd)
                : undefined;
            const through = points[points.length - 1]?.acquiredAt;
            const record: BaselineRecord =
              established === undefined || through === undefined
                ? { controlId, metric, fromIso }
                : {
                    controlId,
                    metric,
                    fromIso,
                    mean: established.mean,
                    sd: established.sd,
                    runs: established.runs,
                    throughIso: through,
                  };
            ledger.transaction(() => saveBaseline(ledger, record, createdAt));
            outcome[metric] =
              established === undefined
                ? { fromIso, runsSoFar: points.length }
                : { mean: established.mean, sd: established.sd, runs: established.runs };
            process.stdout.write(
              established === undefined
                ? `${controlId} ${metricLabel(metric)}: new baseline starts ${fromIso}; ${points.length} of ${control.baselineRuns} runs so far, charts resume after ${control.baselineRuns}\n`
                : `${controlId} ${metricLabel(metric)}: baseline mean ${Number(established.mean.toPrecision(6))}, SD ${Number(established.sd.toPrecision(4))} from ${established.runs} runs (${fromIso} to ${through})\n`,
            );
          }
          ledger.transaction(() => {
            recordAction(ledger, {
              action: 'rebaseline',
              controlId,
              comment: options.comment,
              by,
              atIso: createdAt,
              detail: { fromIso, excludedRuns: [...excluded], metrics: outcome },
            });
          });
          process.stdout.write(
            `${baselineRecords(ledger).filter((r) => r.controlId === controlId).length} baseline record(s) stored for ${controlId}; recorded: rebaseline by ${by}: ${options.comment}\n`,
          );
        } finally {
          ledger.close();
        }
      },
    );

    withConfigOption(
      rules
        .command('ack')
        .description(
          'acknowledge the flags of a run (or one rule of it) with a comment: they close and stay in the history with who, when and why',
        )
        .argument('<set>', 'set id of the flagged run')
        .requiredOption('--comment <text>', 'why (recorded with who and when)')
        .option('--rule <id>', "only this rule's flags")
        .option('--by <name>', 'who (default: the OS user)'),
    ).action((setId: string, options: { comment: string; rule?: string; by?: string; config?: string }) => {
      const config = configFromOptions(options);
      const ledger = openLedger(config.folders.state);
      try {
        const run = observationHistory(ledger).find((observation) => observation.setId === setId);
        if (run === undefined)
          throw new ConfigInvalid(`no QC run with set id "${setId}" in the ledger`, {
            hint: 'Use a set id from `driftlight rules simulate` or the result file name.',
          });
        const key = options.rule === undefined ? undefined : `${options.rule}|${run.controlId}|`;
        const atIso = new Date().toISOString();
        const by = actor(options.by);
        let marked = 0;
        ledger.transaction(() => {
          const id = recordAction(ledger, {
            action: 'acknowledge',
            controlId: run.controlId,
            setId,
            flagKey: options.rule,
            comment: options.comment,
            by,
            atIso,
            detail: {},
          });
          if (key === undefined) marked = acknowledgeFlags(ledger, setId, undefined, id, atIso);
          else
            for (const metric of Object.keys(run.metrics))
              marked += acknowledgeFlags(ledger, setId, `${key}${metric}`, id, atIso);
        });
        process.stdout.write(
          `acknowledged ${marked} flag(s) of run ${setId} (${run.controlId}) by ${by}: ${options.comment}\n`,
        );
      } finally {
        ledger.close();
      }
    });

    withConfigOption(
      rules
        .command('exclude')
        .description(
          'leave a run out of the baseline and the charts (e.g. a known bad cuvette), recorded with who, when and why; `--include` takes it back',
        )
        .argument('<set>', 'set id of the run')
        .requiredOption('--comment <text>', 'why (recorded with who and when)')
        .option('--include', 'take a previously excluded run back')
        .option('--by <name>', 'who (default: the OS user)'),
    ).action((setId: string, options: { comment: string; include?: boolean; by?: string; config?: string }) => {
      const config = configFromOptions(options);
      const ledger = openLedger(config.folders.state);
      try {
        const run = observationHistory(ledger).find((observation) => observation.setId === setId);
        if (run === undefined)
          throw new ConfigInvalid(`no QC run with set id "${setId}" in the ledger`, {
            hint: 'Use a set id from `driftlight rules simulate` or the result file name.',
          });
        const by = actor(options.by);
        const action = options.include === true ? 'include' : 'exclude';
        ledger.transaction(() => {
          recordAction(ledger, {
            action,
            controlId: run.controlId,
            setId,
            comment: options.comment,
            by,
            atIso: new Date().toISOString(),
            detail: { acquiredAt: run.acquiredAt },
          });
        });
        process.stdout.write(
          `${action === 'exclude' ? 'excluded' : 'included'} run ${setId} (${run.controlId}, acquired ${run.acquiredAt}) by ${by}: ${options.comment}\n` +
            `Charts use it from the next run on; run \`driftlight rules rebaseline ${run.controlId} --from DATE --comment …\` to recompute a baseline without it.\n`,
        );
      } finally {
        ledger.close();
      }
    });
  },
};
