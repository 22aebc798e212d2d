// A rule set: controls, rules and the default time zone, parsed from YAML and validated with zod.
// Rule files are data only; nothing in them is ever executed.
import { z } from 'zod';
import { LineCounter, parseDocument } from 'yaml';
import { ConfigInvalid } from '../model/errors.js';
import { nearestName, problemLines, problemsFromIssues, type ConfigProblem } from '../model/config-problems.js';
import { controlSchema, type ControlDefinition } from './controls.js';
import { describeScope, isInstrumentScope, namedControls, scopeJudgesControl } from './rule-base.js';
import { RULE_KIND_NAMES, RULE_KINDS, ruleNeedsBaseline, type Rule, type RuleKindName } from './rule-kinds/registry.js';
import { isValidTimeZone } from './time.js';

export interface RuleSet {
  readonly version: 1;
  readonly name?: string | undefined;
  /** Default zone for local-time rules (IANA or ±HH:MM). */
  readonly timeZone: string;
  readonly controls: readonly ControlDefinition[];
  readonly rules: readonly Rule[];
}

const headerSchema = z.strictObject({
  version: z.literal(1, { error: 'expected 1' }).default(1),
  name: z.string().optional(),
  timeZone: z
    .string()
    .refine(isValidTimeZone, { error: 'expected an IANA time zone such as Europe/Berlin, or an offset such as +01:00' })
    .default('UTC'),
  controls: z.array(controlSchema, { error: 'expected a list of controls' }).default([]),
  rules: z.array(z.unknown(), { error: 'expected a list of rules' }).default([]),
});

type Problem = ConfigProblem;

/** `rules[2].lambda` from ['rules', 2, 'lambda']. */
export function formatConfigPath(path: readonly PropertyKey[]): string {
  return path
    .map((part, index) => (typeof part === 'number' ? `[${part}]` : `${index === 0 ? '' : '.'}${String(part)}`))
    .join('');
}

/** Problems of one rule entry: its kind, then that kind's schema. */
function parseRule(raw: unknown, index: number, problems: Problem[]): Rule | undefined {
  const kind = typeof raw === 'object' && raw !== null ? (raw as Record<string, unknown>)['kind'] : undefined;
  if (typeof kind !== 'string' || !(kind in RULE_KINDS)) {
    const near = typeof kind === 'string' ? nearestName(kind, RULE_KIND_NAMES) : undefined;
    problems.push({
      path: ['rules', index, 'kind'],
      message: `${kind === undefined ? 'missing' : `unknown kind ${JSON.stringify(kind)}`}; ${near === undefined ? `expected one of ${RULE_KIND_NAMES.join(', ')}` : `did you mean "${near}"?`}`,
    });
    return undefined;
  }
  const schema = RULE_KINDS[kind as RuleKindName].schema;
  const result = schema.safeParse(raw);
  if (!result.success) {
    problems.push(...problemsFromIssues(result.error.issues, schema, raw, ['rules', index]));
    return undefined;
  }
  return result.data;
}

/**
 * Cross-entry checks: unique ids, charts that need a control baseline, and — when the file defines
 * controls of its own — scopes that name a defined control (else checked when merged with the config).
 */
function crossCheck(controls: readonly ControlDefinition[], rules: readonly Rule[], problems: Problem[]): void {
  const controlIds = new Set<string>();
  controls.forEach((control, index) => {
    if (controlIds.has(control.id))
      problems.push({ path: ['controls', index, 'id'], message: `duplicate control id "${control.id}"` });
    controlIds.add(control.id);
  });
  const ruleIds = new Set<string>();
  rules.forEach((rule, index) => {
    if (ruleIds.has(rule.id))
      problems.push({ path: ['rules', index, 'id'], message: `duplicate rule id "${rule.id}"` });
    ruleIds.add(rule.id);
    const unknown = controls.length === 0 ? [] : (namedControls(rule.scope) ?? []).filter((id) => !controlIds.has(id));
    if (unknown.length > 0) {
      problems.push({
        path: ['rules', index, 'scope'],
        message: `no control with id "${unknown.join('", "')}" is defined under controls`,
      });
    }
    if (isInstrumentScope(rule.scope) && ruleNeedsBaseline(rule)) {
      problems.push({
        path: ['rules', index, 'scope'],
        message: `${rule.kind} judges against a control's mean and SD; scope it to a control`,
      });
    }
  });
}

/** Parses and validates a rule-set YAML text (pure); throws ConfigInvalid naming the file, line and config path. O(size). */
export function parseRuleSet(yamlText: string, sourceName: string): RuleSet {
  const lineCounter = new LineCounter();
  const document = parseDocument(yamlText, { lineCounter, prettyErrors: true });
  const yamlError = document.errors[0];
  if (yamlError !== undefined) {
    const line = yamlError.linePos?.[0].line;
    throw new ConfigInvalid(`not valid YAML: ${yamlError.message.split('\n')[0] ?? ''}`, {
      file: sourceName,
      hint: 'Fix the YAML syntax at the named line (indentation, a missing colon or quote).',
      line,
    });
  }
  const problems: Problem[] = [];
  const raw: unknown = document.toJS() ?? {};
  const header = headerSchema.safeParse(raw);
  let ruleSet: RuleSet | undefined;
  if (!header.success) {
    problems.push(...problemsFromIssues(header.error.issues, headerSchema, raw));
  } else {
    const rules: Rule[] = [];
    header.data.rules.forEach((raw, index) => {
      const rule = parseRule(raw, index, problems);
      if (rule !== undefined) rules.push(rule);
    });
    if (problems.length === 0) crossCheck(header.data.controls, rules, problems);
    ruleSet = {
      version: 1,
      name: header.data.name,
      timeZone: header.data.timeZone,
      controls: header.data.controls,
      rules,
    };
  }
  const first = problems[0];
  if (first !== undefined || ruleSet === undefined) {
    const path = first === undefined ? '' : formatConfigPath(first.path);
    const node =
      first === undefined
        ? undefined
        : document.getIn(
            first.path.filter((p) => typeof p !== 'symbol'),
            true,
          );
    const offset =
      typeof node === 'object' && node !== null && 'range' in node && Array.isArray(node.range)
        ? (node.range[0] as number)
        : undefined;
    // One line per problem, each with its own path (the first also locates the file line).
    const lines = problemLines(problems);
    throw new ConfigInvalid(lines.length === 0 ? 'invalid rule set' : lines.join('\n'), {
      file: sourceName,
      hint: 'Fix the named entry of the rule file (docs/qc.md lists every kind and parameter); `driftlight rules check FILE` validates it.',
      configPath: path,
      line: offset === undefined ? undefined : lineCounter.linePos(offset).line,
    });
  }
  return Object.freeze(ruleSet);
}

/** The rules that judge a control (scope absent, or naming it), in file order. O(rules). */
export function rulesJudgingControl(ruleSet: RuleSet, controlId: string): Rule[] {
  return ruleSet.rules.filter((rule) => scopeJudgesControl(rule.scope, controlId));
}

/**
 * The rule set with more controls (e.g. from driftlight.yaml) and optionally another default zone.
 * A control id defined twice, or a rule naming an undefined control, throws ConfigInvalid (pure).
 */
export function withControls(
  ruleSet: RuleSet,
  extra: readonly ControlDefinition[],
  sourceName: string,
  timeZone?: string,
): RuleSet {
  const known = new Map(ruleSet.controls.map((control) => [control.id, control]));
  for (const [index, control] of extra.entries()) {
    if (known.has(control.id)) {
      throw new ConfigInvalid(
        `control "${control.id}" is defined twice: in the rule set and in the config's controls`,
        {
          file: sourceName,
          configPath: `controls[${index}].id`,
          hint: 'Define each control once, in driftlight.yaml `controls` (id, sampleIdPattern, targets); remove it from the rule file.',
        },
      );
    }
    known.set(control.id, control);
  }
  const merged: RuleSet = Object.freeze({
    ...ruleSet,
    controls: [...ruleSet.controls, ...extra],
    ...(timeZone === undefined ? {} : { timeZone }),
  });
  merged.rules.forEach((rule, index) => {
    const unknown = (namedControls(rule.scope) ?? []).filter((id) => !known.has(id));
    if (unknown.length > 0) {
      throw new ConfigInvalid(
        `rule "${rule.id}" names control "${unknown.join('", "')}", which no controls entry defines (defined: ${[...known.keys()].join(', ') || 'none'})`,
        {
          configPath: `rules[${index}].scope`,
          hint: "Add the control to driftlight.yaml `controls`, or leave the rule's scope out so it judges every control.",
        },
      );
    }
  });
  return merged;
}

/** Warnings about a merged rule set: no control defined, or a control that no rule judges. O(controls × rules). */
export function ruleSetWarnings(ruleSet: RuleSet): string[] {
  const warnings: string[] = [];
  if (ruleSet.controls.length === 0) {
    warnings.push(
      'no control is defined: only instrument checks are judged (add a `controls` entry to driftlight.yaml)',
    );
  }
  for (const control of ruleSet.controls) {
    if (rulesJudgingControl(ruleSet, control.id).length === 0) {
      warnings.push(
        `control "${control.id}" is judged by no rule: every rule is scoped to other controls or the instrument`,
      );
    }
  }
  return warnings;
}

/** "yield-westgard (controlQuantumYield @ every control)". */
export function describeRuleScope(rule: Rule): string {
  return `${rule.id} (${rule.metric} @ ${describeScope(rule.scope)})`;
}
