// The effective rule set the pipeline and the `rules`/`config` commands use: the rule file (or the
// built-in one, which defines no control) plus the controls defined once in driftlight.yaml, with
// the lab's time zone from `rules.timeZone`.
import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { DriftlightConfig } from '../config/resolve.js';
import type { ControlConfig } from '../config/sections/controls.js';
import { ConfigInvalid } from '../model/errors.js';
import { controlSchema, parseRuleSet, withControls, type ControlDefinition, type RuleSet } from '../qc/index.js';

/** rules/default.yaml of the installed package (from src/ under vitest, from dist/src/ when built). */
export function defaultRuleSetFile(): string {
  const candidates = ['../../rules/default.yaml', '../../../rules/default.yaml'].map((relative) =>
    fileURLToPath(new URL(relative, import.meta.url)),
  );
  const found = candidates.find((candidate) => existsSync(candidate));
  if (found === undefined)
    throw new ConfigInvalid('the built-in rule set rules/default.yaml is missing from the installation', {
      configPath: 'rules.file',
    });
  return found;
}

/** Reads and validates a rule-set file (default: the built-in one); throws ConfigInvalid. */
export function loadRuleSetFile(file?: string): RuleSet {
  const path = file ?? defaultRuleSetFile();
  if (!existsSync(path))
    throw new ConfigInvalid(`rule set file not found: ${path}`, { file: path, configPath: 'rules.file' });
  return parseRuleSet(readFileSync(path, 'utf8'), path);
}

/** The config's `controls` entries as rule-set controls (targets, plus targetYield/sdYield and targetTauNs/sdTauNs). */
export function controlsFromConfig(entries: readonly ControlConfig[]): ControlDefinition[] {
  return entries.map((entry, index) => {
    const targets: Record<string, { mean: number; sd: number }> = { ...(entry.targets ?? {}) };
    if (entry.targetYield !== undefined && entry.sdYield !== undefined)
      targets['controlQuantumYield'] = { mean: entry.targetYield, sd: entry.sdYield };
    if (entry.targetTauNs !== undefined && entry.sdTauNs !== undefined)
      targets['meanLifetimeNs'] = { mean: entry.targetTauNs, sd: entry.sdTauNs };
    const parsed = controlSchema.safeParse({
      id: entry.id,
      ...(entry.label === undefined ? {} : { label: entry.label }),
      match: {
        sampleIdPattern: entry.sampleIdPattern,
        ...(entry.measurement === undefined ? {} : { measurement: entry.measurement }),
      },
      targets,
      baselineRuns: entry.baselineRuns,
    });
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      throw new ConfigInvalid(issue?.message ?? 'invalid control', {
        configPath: `controls[${index}]${issue === undefined ? '' : `.${issue.path.join('.')}`}`,
      });
    }
    return parsed.data;
  });
}

/** The rule set with the config's controls added (a control id defined in both places is refused). */
export function withConfigControls(ruleSet: RuleSet, entries: readonly ControlConfig[], timeZone?: string): RuleSet {
  return withControls(ruleSet, controlsFromConfig(entries), 'controls', timeZone);
}

/** The effective rule set of a config: rules.file (or the built-in set) + config controls + rules.timeZone. */
export function effectiveRuleSet(config: DriftlightConfig, ruleFile?: string): RuleSet {
  return withConfigControls(loadRuleSetFile(ruleFile ?? config.rules.file), config.controls, config.rules.timeZone);
}
